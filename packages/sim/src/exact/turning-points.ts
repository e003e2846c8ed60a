import type { ModeSystem } from './mode-system.ts';
import { rowDot } from './mode-system.ts';

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
  pending: boolean;
}

/**
 * Turning points of the probes whose figures are asked for, located on the exact solution: the
 * largest and smallest sample (at every step end) are kept with the steps on either side; at the
 * end, where the slope changes sign inside one of those steps, its zero is found by Newton's
 * method with the exact curvature. Peaks then come from samples and located points only —
 * nothing is interpolated, and a step never spans an event or a breakpoint.
 */
export class TurningPoints {
  private readonly max: Best[];
  private readonly min: Best[];

  constructor(
    private readonly rows: number[],
    private readonly N: number,
  ) {
    const step = (): Step => ({ sys: null as unknown as ModeSystem, z: new Float64Array(N), t0: 0, h: 0 });
    const blank = (): Best => ({ value: NaN, time: NaN, L: step(), R: step(), hasL: false, hasR: false, pending: false });
    this.max = rows.map(blank);
    this.min = rows.map(blank);
  }

  /** A new segment: the step after a boundary is not a continuation. */
  segmentStart(): void {
    for (const b of this.max) b.pending = false;
    for (const b of this.min) b.pending = false;
  }

  /**
   * The samples at tEnd (values[offset + r] for each row) ending the step of length h that
   * started from zStart in `sys` (h = 0: a segment start).
   */
  sample(values: Float64Array, offset: number, sys: ModeSystem, tEnd: number, h: number, zStart: Float64Array, last: boolean): void {
    for (let r = 0; r < this.rows.length; r++) {
      const y = values[offset + r];
      this.update(this.max[r], y, 1, sys, tEnd, h, zStart, last);
      this.update(this.min[r], y, -1, sys, tEnd, h, zStart, last);
    }
  }

  private update(b: Best, y: number, dir: number, sys: ModeSystem, tEnd: number, h: number, zStart: Float64Array, last: boolean): void {
    if (b.pending && h > 0) {
      keep(b.R, sys, zStart, tEnd - h, h);
      b.hasR = true;
      b.pending = false;
    }
    if (Number.isNaN(b.value) || dir * (y - b.value) > 0) {
      b.value = y;
      b.time = tEnd;
      b.hasL = h > 0;
      if (h > 0) keep(b.L, sys, zStart, tEnd - h, h);
      b.hasR = false;
      b.pending = !last;
    }
  }

  /** The located extreme points of signal `row` beyond the best samples: at most one maximum and one minimum. */
  located(row: number, N: number): { time: number; value: number }[] {
    const r = this.rows.indexOf(row);
    if (r < 0) return [];
    const out: { time: number; value: number }[] = [];
    for (const [b, dir] of [
      [this.max[r], 1],
      [this.min[r], -1],
    ] as const) {
      let best: { time: number; value: number } | null = null;
      for (const st of [b.hasL ? b.L : null, b.hasR ? b.R : null]) {
        if (!st) continue;
        const p = turningPoint(st, row, N, dir);
        if (p && dir * (p.value - b.value) > 0 && (!best || dir * (p.value - best.value) > 0)) best = p;
      }
      if (best) out.push(best);
    }
    return out;
  }
}

function keep(st: Step, sys: ModeSystem, z: Float64Array, t0: number, h: number): void {
  st.sys = sys;
  st.z.set(z);
  st.t0 = t0;
  st.h = h;
}

/** The zero of the signal's slope inside the step where it goes from rising to falling (dir 1) or the reverse (dir −1). */
function turningPoint(st: Step, row: number, N: number, dir: number): { time: number; value: number } | null {
  const { sys, z, h } = st;
  const S1row = sys.S1.subarray(row * N, row * N + N);
  const S2row = new Float64Array(N);
  for (let k = 0; k < N; k++) {
    const a = S1row[k];
    if (a === 0) continue;
    for (let j = 0; j < N; j++) S2row[j] += a * sys.M[k * N + j];
  }
  const zt = new Float64Array(N);
  const slope = (s: number) => {
    sys.ladder.apply(s, z, zt);
    let p = 0;
    let c = 0;
    for (let j = 0; j < N; j++) {
      p += S1row[j] * zt[j];
      c += S2row[j] * zt[j];
    }
    return { p: dir * p, c: dir * c };
  };
  const pa = slope(0).p;
  const pb = slope(h).p;
  if (!(pa > 0 && pb < 0)) return null;
  let a = 0;
  let b = h;
  let s = (pa * h) / (pa - pb);
  const tEps = 1e-13 * Math.max(1, Math.abs(st.t0 + h));
  for (let it = 0; it < 100 && b - a > tEps; it++) {
    if (!(s > a && s < b)) s = 0.5 * (a + b);
    const { p, c } = slope(s);
    if (p > 0) a = s;
    else b = s;
    if (b - a <= tEps) break;
    let next = c !== 0 ? s - p / c : NaN;
    // once that close, step past the root so that it ends up bracketed
    if (Math.abs(next - s) < tEps) next += p > 0 ? tEps : -tEps;
    s = next > a && next < b ? next : 0.5 * (a + b);
  }
  const ts = 0.5 * (a + b);
  sys.ladder.apply(ts, z, zt);
  return { time: st.t0 + ts, value: rowDot(sys.S, row, N, zt) };
}
