import { matvecRect, rowDot } from './dense.ts';
import type { ModeSystem } from './mode-system.ts';

interface Step {
  sys: ModeSystem;
  z: Float64Array;
  t0: number;
  h: number;
}

interface Best {
  value: number;
  time: number;
  /** The step ending at the best sample, and the one after it (same segment), where the extreme may lie (buffers reused). */
  L: Step;
  R: Step;
  hasL: boolean;
  hasR: boolean;
  /** The best sample ended the step before the current one; its steps are copied once a step passes without a new best. */
  pending: boolean;
  /** That step had a predecessor in the same segment (false: the best is a segment start). */
  pendingHasL: boolean;
}

/**
 * Turning points of the probes whose figures are asked for, located on the exact solution: the
 * largest and smallest sample (at every step end) are kept with the steps on either side; at the
 * end, where the slope changes sign inside one of those steps, its zero is found by Newton's
 * method with the exact curvature. Peaks then come from samples and located points only —
 * nothing is interpolated, and a step never spans an event or a breakpoint. The steps' start
 * states are copied only when a best sample has survived one step (a turning point), so a
 * monotone signal costs a comparison per step.
 */
export class TurningPoints {
  private readonly max: Best[];
  private readonly min: Best[];
  /** The current and the previous step (start state with its exosystems, mode, start time, length). */
  private cur: Step;
  private prev: Step;

  constructor(
    private readonly rows: number[],
    private readonly N: number,
  ) {
    const step = (): Step => ({ sys: null as unknown as ModeSystem, z: new Float64Array(N), t0: 0, h: 0 });
    const blank = (): Best => ({
      value: NaN,
      time: NaN,
      L: step(),
      R: step(),
      hasL: false,
      hasR: false,
      pending: false,
      pendingHasL: false,
    });
    this.max = rows.map(blank);
    this.min = rows.map(blank);
    this.cur = step();
    this.prev = step();
  }

  /** A new segment: the step after a boundary is not a continuation. */
  segmentStart(): void {
    for (const b of this.max) this.settle(b, false);
    for (const b of this.min) this.settle(b, false);
  }

  /**
   * A step starts from z (exosystems filled) in mode sys: at span[0], of length span[2] (the
   * engine's step times; read from the array, as doubles passed to a call are boxed).
   */
  stepStart(sys: ModeSystem, z: Float64Array, span: Float64Array): void {
    if (this.rows.length === 0) return;
    const t = this.prev;
    this.prev = this.cur;
    this.cur = t;
    t.sys = sys;
    t.z.set(z);
    t.t0 = span[0];
    t.h = span[2];
  }

  /**
   * Samples values[offset + r] at tEnd = span[1]: the end of the current step (h = span[2] > 0), or a segment start
   * (h = 0, before its first step). `last`: the segment ends here.
   */
  sample(values: Float64Array, offset: number, span: Float64Array, last: boolean): void {
    const tEnd = span[1];
    const h = span[2];
    // (one loop over both lists, no call per sample: a double passed to a call that is not
    // inlined is boxed, and this runs at every step end)
    const rows = this.rows.length;
    for (let k = 0; k < 2 * rows; k++) {
      const r = k < rows ? k : k - rows;
      const b = k < rows ? this.max[r] : this.min[r];
      const dir = k < rows ? 1 : -1;
      const y = values[offset + r];
      if (Number.isNaN(b.value) || dir * (y - b.value) > 0) {
        b.value = y;
        b.time = tEnd;
        b.hasL = false;
        b.hasR = false;
        b.pending = true;
        b.pendingHasL = h > 0;
        if (last) this.settle(b, false);
      } else if (b.pending && h > 0) this.settle(b, true);
    }
  }

  /** Copies the steps around a pending best: the step it ended (now `prev`, or `cur` if it ended the segment) and the next one. */
  private settle(b: Best, next: boolean): void {
    if (!b.pending) return;
    b.pending = false;
    if (next) {
      if (b.pendingHasL) {
        copyStep(b.L, this.prev);
        b.hasL = true;
      }
      copyStep(b.R, this.cur);
      b.hasR = true;
    } else if (b.pendingHasL) {
      copyStep(b.L, this.cur);
      b.hasL = true;
    }
  }

  /**
   * The located extreme points of signal `row` beyond the best samples: a maximum (dir 1), a
   * minimum (dir −1), or both (dir 0).
   */
  located(row: number, N: number, dir: number): { time: number; value: number }[] {
    const r = this.rows.indexOf(row);
    if (r < 0) return [];
    const out: { time: number; value: number }[] = [];
    const work = { zt: new Float64Array(N), zb: new Float64Array(N), s1: new Float64Array(N), s2: new Float64Array(N) };
    for (const [b, d] of [
      [this.max[r], 1],
      [this.min[r], -1],
    ] as const) {
      if (dir !== 0 && d !== dir) continue;
      let best: { time: number; value: number } | null = null;
      for (const st of [b.hasL ? b.L : null, b.hasR ? b.R : null]) {
        if (!st) continue;
        const p = turningPoint(st, row, N, d, work);
        if (p && d * (p.value - b.value) > 0 && (!best || d * (p.value - best.value) > 0)) best = p;
      }
      if (best) out.push(best);
    }
    return out;
  }
}

function copyStep(to: Step, from: Step): void {
  keep(to, from.sys, from.z, from.t0, from.h);
}

function keep(st: Step, sys: ModeSystem, z: Float64Array, t0: number, h: number): void {
  st.sys = sys;
  st.z.set(z);
  st.t0 = t0;
  st.h = h;
}

const dot = (a: Float64Array, b: Float64Array) => {
  let s = 0;
  for (let j = 0; j < a.length; j++) s += a[j] * b[j];
  return s;
};

/**
 * The zero of the signal's slope inside the step where it goes from rising to falling (dir 1)
 * or the reverse (dir −1): first guess from the cubic through the exact slopes and curvatures
 * at both ends, then Newton steps on the exact solution.
 */
function turningPoint(
  st: Step,
  row: number,
  N: number,
  dir: number,
  w: { zt: Float64Array; zb: Float64Array; s1: Float64Array; s2: Float64Array },
): { time: number; value: number } | null {
  const { sys, z, h } = st;
  const s1 = w.s1;
  const s2 = w.s2;
  s1.set(sys.S1.subarray(row * N, row * N + N));
  s2.fill(0);
  for (let k = 0; k < N; k++) {
    const a = s1[k];
    if (a === 0) continue;
    for (let j = 0; j < N; j++) s2[j] += a * sys.M[k * N + j];
  }
  const pa = dir * dot(s1, z);
  // the step's end: Φ·z for a regular step, the ladder otherwise
  if (Math.abs(h - sys.ladder.h0) <= 1e-10 * sys.ladder.h0) matvecRect(sys.Phi, N, N, z, w.zb);
  else sys.ladder.apply(h, z, w.zb);
  const pb = dir * dot(s1, w.zb);
  if (!(pa > 0 && pb < 0)) return null;
  const ca = dir * dot(s2, z);
  const cb = dir * dot(s2, w.zb);
  // the cubic q(σ) through (0, pa, h·ca) and (1, pb, h·cb): a root in (0, 1) by bisection and Newton on q
  const q1 = h * ca;
  const q2 = -3 * pa - 2 * h * ca + 3 * pb - h * cb;
  const q3 = 2 * pa + h * ca - 2 * pb + h * cb;
  let lo = 0;
  let hi = 1;
  let sig = pa / (pa - pb);
  for (let it = 0; it < 30; it++) {
    const v = pa + sig * (q1 + sig * (q2 + sig * q3));
    if (v > 0) lo = sig;
    else hi = sig;
    const d = q1 + sig * (2 * q2 + 3 * sig * q3);
    let next = d !== 0 ? sig - v / d : NaN;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (Math.abs(next - sig) < 1e-15) break;
    sig = next;
  }
  // Newton on the exact slope, kept inside the step; the point reported is the last one evaluated
  // (its slope is zero to round-off, so its value is the extreme's)
  let s = sig * h;
  let ts = s;
  const tEps = 1e-13 * Math.max(1, Math.abs(st.t0 + h));
  for (let it = 0; it < 6; it++) {
    sys.ladder.apply(s, z, w.zt);
    ts = s;
    const p = dir * dot(s1, w.zt);
    const c = dir * dot(s2, w.zt);
    if (!(c < 0)) break;
    const next = Math.min(h, Math.max(0, s - p / c));
    if (Math.abs(next - s) <= tEps) break;
    s = next;
  }
  return { time: st.t0 + ts, value: rowDot(sys.S, row, N, w.zt) };
}
