import { type SignalHistory, pieceAt } from '../history.ts';

/**
 * The recorded past of one dead time's input signal (odex engine): one interpolating polynomial per
 * integrator step, sampled from the solver's dense output at Chebyshev–Lobatto nodes (so the
 * delayed signal is exact to interpolation accuracy). Before t = 0 the system is at rest
 * (the signal is 0). Pieces are contiguous; a jump (source edge) sits on a piece boundary,
 * and `value` takes the side that the current integration segment lies on.
 */

/** Polynomial degree of each piece (DEGREE + 1 samples). */
export const DEGREE = 7;
const NS = DEGREE + 1;

/** Lobatto nodes on [0, 1]: (1 − cos(πj/DEGREE))/2, and their barycentric weights. */
export const NODES = new Float64Array(NS);
const WEIGHTS = new Float64Array(NS);
for (let j = 0; j < NS; j++) {
  NODES[j] = (1 - Math.cos((Math.PI * j) / DEGREE)) / 2;
  WEIGHTS[j] = (j % 2 === 0 ? 1 : -1) * (j === 0 || j === DEGREE ? 0.5 : 1);
}
NODES[0] = 0;
NODES[DEGREE] = 1;
/** Last row of the differentiation matrix: p'(1) = Σ END_SLOPE[j]·p(x_j) on [0, 1]. */
const END_SLOPE = new Float64Array(NS);
for (let j = 0; j < DEGREE; j++) {
  END_SLOPE[j] = WEIGHTS[j] / WEIGHTS[DEGREE] / (1 - NODES[j]);
  END_SLOPE[DEGREE] -= END_SLOPE[j];
}

export class LobattoHistory implements SignalHistory {
  private starts: number[] = [];
  private ends: number[] = [];
  private values = new Float64Array(NS * 256);
  private count = 0;
  private cursor = 0;
  /** End of the record, its value and slope there (for the linear extrapolation beyond it). */
  end = 0;
  endValue = 0;
  endSlope = 0;
  /** Largest |value| recorded (the signal's range, for relative tolerances). */
  maxAbs = 0;

  reset(): void {
    this.starts.length = 0;
    this.ends.length = 0;
    this.count = 0;
    this.cursor = 0;
    this.end = 0;
    this.endValue = 0;
    this.endSlope = 0;
    this.maxAbs = 0;
  }

  sample(times: ArrayLike<number>, bias: number, out: Float64Array, at: number): void {
    for (let i = 0; i < times.length; i++) out[at + i] = this.value(times[i], bias);
  }

  /** The odex engine never jumps over time: no quiescence test. */
  steadyOver(): boolean {
    return false;
  }

  /** Beyond the record (a step longer than the dead time): linear extrapolation from its end, checked after the step. */
  extrapolate(tau: number): number {
    return this.endValue + this.endSlope * (tau - this.end);
  }

  /** Appends the piece [a, b] from NS samples at a + NODES[j]·(b − a). */
  push(a: number, b: number, samples: ArrayLike<number>): void {
    if (!(b > a)) return;
    if ((this.count + 1) * NS > this.values.length) {
      const bigger = new Float64Array(this.values.length * 2);
      bigger.set(this.values);
      this.values = bigger;
    }
    const o = this.count * NS;
    for (let j = 0; j < NS; j++) {
      this.values[o + j] = samples[j];
      const m = Math.abs(samples[j]);
      if (m > this.maxAbs) this.maxAbs = m;
    }
    this.starts.push(a);
    this.ends.push(b);
    this.count++;
    let slope = 0;
    for (let j = 0; j < NS; j++) slope += END_SLOPE[j] * samples[j];
    this.endValue = samples[DEGREE];
    this.endSlope = slope / (b - a);
    this.end = b;
  }

  /** The signal at time tau; `bias` is a time inside the segment being integrated minus the delay, which picks the side of a boundary jump. */
  value(tau: number, bias: number): number {
    const n = this.count;
    if (n === 0) return 0;
    const k = pieceAt(this.starts, this.ends, n, this.cursor, tau, bias);
    if (k < 0) return k === -1 ? 0 : this.extrapolate(tau);
    this.cursor = k;
    const starts = this.starts;
    const ends = this.ends;
    const a = starts[k];
    const b = ends[k];
    let x = (tau - a) / (b - a);
    if (x < 0) x = 0;
    else if (x > 1) x = 1;
    const o = k * NS;
    let num = 0;
    let den = 0;
    for (let j = 0; j < NS; j++) {
      const dx = x - NODES[j];
      if (dx === 0) return this.values[o + j];
      const w = WEIGHTS[j] / dx;
      num += w * this.values[o + j];
      den += w;
    }
    return num / den;
  }
}
