/**
 * The recorded past of a dead time's input signal. Before t = 0 the system is at rest (the
 * signal is 0). Pieces are contiguous; a jump (a source edge) sits on a piece boundary, and
 * `value` takes the side that the segment being integrated lies on. Each engine keeps its own
 * kind of piece: odex/lobatto-history.ts (degree-7 polynomials through dense-output samples),
 * exact/hermite-history.ts (quintic Hermite pieces from exact values and derivatives).
 */
export interface SignalHistory {
  /** The signal at time tau; `bias` is a time inside the segment being integrated minus the delay (picks the side of a jump at a piece boundary). */
  value(tau: number, bias: number): number;
  /** The signal at increasing times into out[at …] (the same as `value` at each). */
  sample(times: ArrayLike<number>, bias: number, out: Float64Array, at: number): void;
  /** Largest |value| recorded (the signal's range, for relative tolerances). */
  readonly maxAbs: number;
  /** The signal has stayed within the quiescence tolerance of its latest value since time `since` or earlier. */
  steadyOver(since: number): boolean;
}

/**
 * Index of the piece holding tau (the one on the bias side at a boundary), −1 before the
 * record (at rest) or −2 past its end. `cursor` is a guess (the last piece used).
 */
export function pieceAt(starts: ArrayLike<number>, ends: ArrayLike<number>, n: number, cursor: number, tau: number, bias: number): number {
  const eps = 1e-11 * Math.max(1, Math.abs(tau));
  if (tau < starts[0] + eps) {
    // at rest before the first record; on the boundary itself the bias decides
    if (starts[0] - tau > eps || bias < starts[0]) return -1;
    tau = starts[0];
  }
  if (tau > ends[n - 1] + eps) return -2;
  let k = cursor;
  if (k >= n) k = n - 1;
  if (!(starts[k] <= tau && tau <= ends[k])) {
    // binary search: last piece with start ≤ tau
    let lo = 0;
    let hi = n - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (starts[mid] <= tau) lo = mid;
      else hi = mid - 1;
    }
    k = lo;
  }
  // on a boundary between two pieces: take the one on the bias side
  if (k > 0 && Math.abs(tau - starts[k]) <= eps && bias < starts[k]) k--;
  else if (k + 1 < n && Math.abs(tau - ends[k]) <= eps && bias > ends[k]) k++;
  return k;
}
