import { type SignalHistory, pieceAt } from '../history.ts';

/**
 * The recorded past of one dead time's input signal in the exact engine: one quintic Hermite
 * piece per step, matching the exact value, slope and curvature at both ends of the step (all
 * three are linear functionals of the exact state). Inside a piece the error is at most
 * |y⁽⁶⁾|·h⁶/46080 (the two-point Hermite remainder y⁽⁶⁾(ξ)/6!·s³(h − s)³), i.e. order 6;
 * a signal that is a polynomial of degree ≤ 5 over the step is kept exactly.
 * Stored as monomial coefficients in s = (τ − a)/(b − a) for a five-multiply Horner evaluation.
 */
const NC = 6;

export class HermiteHistory implements SignalHistory {
  private starts: Float64Array;
  private ends: Float64Array;
  private coef: Float64Array;
  private count = 0;
  private readonly args = new Float64Array(8);
  private cursor = 0;
  maxAbs = 0;
  /** Changes smaller than this count as still (quiescence). */
  quietTol = 0;
  /** Value the signal has stayed near, and the end of the last piece that moved away from it. */
  private ref = 0;
  private movedAt = 0;

  /** `capacity`: the pieces expected (the run's planned steps), so that a run rarely grows its arrays. */
  constructor(capacity = 256) {
    const c = Math.max(16, Math.min(1 << 14, Math.ceil(capacity)));
    this.starts = new Float64Array(c);
    this.ends = new Float64Array(c);
    this.coef = new Float64Array(NC * c);
  }

  /** Appends [a, b] from the value, slope and second derivative at each end (right limits at a, left limits at b). */
  push(a: number, b: number, y0: number, d0: number, e0: number, y1: number, d1: number, e1: number): void {
    const v = this.args;
    v[0] = a;
    v[1] = b;
    v[2] = y0;
    v[3] = d0;
    v[4] = e0;
    v[5] = y1;
    v[6] = d1;
    v[7] = e1;
    this.pushFrom(v, 0, v, 2, v, 5);
  }

  /**
   * `push` with its numbers read from arrays: [a, b] at span[so], the start's value, slope and
   * second derivative at from[fo], the end's at to[to_]. The engine's per-step form: doubles
   * passed as arguments to a call that is not inlined are each boxed on the heap.
   */
  pushFrom(span: Float64Array, so: number, from: Float64Array, fo: number, to: Float64Array, to_: number): void {
    const a = span[so];
    const b = span[so + 1];
    const y0 = from[fo];
    const d0 = from[fo + 1];
    const e0 = from[fo + 2];
    const y1 = to[to_];
    const d1 = to[to_ + 1];
    const e1 = to[to_ + 2];
    const h = b - a;
    if (!(h > 0)) return;
    if (this.count === this.starts.length) {
      const grow = (x: Float64Array) => {
        const bigger = new Float64Array(x.length * 2);
        bigger.set(x);
        return bigger;
      };
      this.starts = grow(this.starts);
      this.ends = grow(this.ends);
      this.coef = grow(this.coef);
    }
    const D0 = d0 * h;
    const E0 = e0 * h * h;
    const D1 = d1 * h;
    const E1 = e1 * h * h;
    const o = this.count * NC;
    const c = this.coef;
    c[o] = y0;
    c[o + 1] = D0;
    c[o + 2] = 0.5 * E0;
    c[o + 3] = -10 * y0 - 6 * D0 - 1.5 * E0 + 10 * y1 - 4 * D1 + 0.5 * E1;
    c[o + 4] = 15 * y0 + 8 * D0 + 1.5 * E0 - 15 * y1 + 7 * D1 - E1;
    c[o + 5] = -6 * y0 - 3 * D0 - 0.5 * E0 + 6 * y1 - 3 * D1 + 0.5 * E1;
    this.starts[this.count] = a;
    this.ends[this.count] = b;
    this.count++;
    const m = Math.max(Math.abs(y0), Math.abs(y1));
    if (m > this.maxAbs) this.maxAbs = m;
    const tol = this.quietTol;
    // the slope and curvature terms bound how far the piece strays between its ends
    if (
      Math.abs(y0 - this.ref) > tol ||
      Math.abs(y1 - this.ref) > tol ||
      Math.abs(D0) + Math.abs(E0) > tol ||
      Math.abs(D1) + Math.abs(E1) > tol
    ) {
      this.ref = y1;
      this.movedAt = b;
    }
  }

  /** Appends a constant piece (a quiescence jump). */
  pushConstant(a: number, b: number, v: number): void {
    this.push(a, b, v, 0, 0, v, 0, 0);
  }

  steadyOver(since: number): boolean {
    return this.count > 0 && this.movedAt <= since;
  }

  /** The pieces' monomial coefficients, six per piece (piece p at 6p … 6p + 5). */
  get coefficients(): Float64Array {
    return this.coef;
  }

  /**
   * For the step in `when` ([t, h, …]) and a dead time `delay`: the first of two contiguous
   * pieces that are whole steps of length h (to 1e-11) when τ = t − delay lies strictly inside it
   * (the window [τ, τ + h] then lies in them, its nodes at fixed places); −1 otherwise. `phase`
   * gets (τ − start)/h. Walks forward from the cursor.
   */
  latticePair(when: Float64Array, delay: number): number {
    const tau = when[0] - delay;
    const h = when[1];
    const n = this.count;
    const starts = this.starts;
    const ends = this.ends;
    let p = this.cursor;
    if (p >= n || starts[p] > tau) return -1;
    while (p + 1 < n && tau >= ends[p]) p++;
    if (p + 1 >= n) return -1;
    const tol = 1e-11 * h;
    const a = starts[p];
    const b = ends[p];
    if (Math.abs(b - a - h) > tol || starts[p + 1] !== b || Math.abs(ends[p + 1] - b - h) > tol) return -1;
    const phase = (tau - a) / h;
    // (a node within round-off of a piece end is left to `sample`, whose bias picks the side)
    if (!(phase > 1e-6 && phase < 1 - 1e-6)) return -1;
    this.cursor = p;
    this.phase = phase;
    return p;
  }

  /** Set by `latticePair`. */
  phase = 0;

  /** Values at increasing times, walking the pieces forward from the cursor (the dead-time window of a step). */
  sample(times: ArrayLike<number>, bias: number, out: Float64Array, at: number): void {
    const n = this.count;
    const starts = this.starts;
    const ends = this.ends;
    const co = this.coef;
    let p = this.cursor < n ? this.cursor : n - 1;
    for (let i = 0; i < times.length; i++) {
      const tau = times[i];
      const eps = 1e-11 * Math.max(1, Math.abs(tau));
      while (p + 1 < n && tau >= ends[p] - eps) p++;
      if (n === 0 || !(tau > starts[p] + eps && tau < ends[p] - eps)) {
        // a boundary, before the record or past it: the general lookup decides the side
        out[at + i] = this.value(tau, bias);
        p = this.cursor;
        continue;
      }
      const a = starts[p];
      const s = (tau - a) / (ends[p] - a);
      const o = p * NC;
      out[at + i] = co[o] + s * (co[o + 1] + s * (co[o + 2] + s * (co[o + 3] + s * (co[o + 4] + s * co[o + 5]))));
    }
    if (n > 0) this.cursor = p;
  }

  value(tau: number, bias: number): number {
    const n = this.count;
    if (n === 0) return 0;
    // fast path: strictly inside the last piece used or the one after it (reads move forward)
    let p = this.cursor;
    for (let q = 0; q < 2 && p < n; q++, p++) {
      const a = this.starts[p];
      const b = this.ends[p];
      const eps = 1e-11 * Math.max(1, Math.abs(tau));
      if (tau > a + eps && tau < b - eps) {
        this.cursor = p;
        const s = (tau - a) / (b - a);
        const o = p * NC;
        const co = this.coef;
        return co[o] + s * (co[o + 1] + s * (co[o + 2] + s * (co[o + 3] + s * (co[o + 4] + s * co[o + 5]))));
      }
    }
    const k = pieceAt(this.starts, this.ends, n, this.cursor, tau, bias);
    if (k === -1) return 0;
    // past the end: never read by the exact engine (steps are at most the dead time); hold the last value
    const kk = k === -2 ? n - 1 : k;
    this.cursor = kk;
    const a = this.starts[kk];
    let s = (tau - a) / (this.ends[kk] - a);
    if (s < 0) s = 0;
    else if (s > 1) s = 1;
    const o = kk * NC;
    const c = this.coef;
    return c[o] + s * (c[o + 1] + s * (c[o + 2] + s * (c[o + 3] + s * (c[o + 4] + s * c[o + 5]))));
  }
}
