import { type Complex, cabs } from './complex.ts';
import { InputError, MAX_ORDER } from './errors.ts';
import { type FrequencyEvaluator, frequencyEvaluator, frequencyRange } from './frequency.ts';
import * as P from './poly.ts';
import { polyRoots } from './roots.ts';
import type { TransferFunction } from './transfer.ts';
import { MAX_PADE_ORDER, padeDelay, padeOrderFor } from './pade.ts';

/**
 * Stability margins of a loop transfer L(s) (characteristic equation 1 + L = 0), from the
 * exact frequency response (dead time kept exact), together with the closed-loop verdict from
 * the closed-loop poles. Margins never decide stability on their own.
 *
 * Definitions (Ogata, Sec. 7-6; Skogestad & Postlethwaite, Sec. 2.4.3 (from memory)):
 *  - gain crossover ω_gc: |L(jω)| = 1 (all of them are found); phase margin PMᵢ = 180° + ∠L(jωᵢ),
 *    wrapped to (−180°, 180°]; the reported phase margin is the smallest (worst) one.
 *  - delay margin: min over gain crossovers of the extra dead time that puts the Nyquist curve
 *    through −1 there. Dead time only adds lag (−ωT), so for a stable closed loop it is the lag
 *    still available, ((180° + ∠L) mod 360°)[rad]/ωᵢ ≥ 0 — a crossover reached with phase lead
 *    (∠L > 0, e.g. an inner loop read with its outer loop closed) has PMᵢ < 0 after wrapping yet
 *    a positive delay margin. For an unstable closed loop it is PMᵢ[rad]/ωᵢ (≤ 0 where PMᵢ is).
 *  - phase crossover ω_pc: ∠L(jω) = −180° + k·360° (all of them); each gives the factor
 *    1/|L(jω_pc)| that moves the curve onto −1. Gain margin = the smallest factor above 1;
 *    lower gain margin = the largest factor below 1 (conditionally stable loops).
 *  - Ms = max |1/(1 + L)|, Mt = max |L/(1 + L)| over ω (grid maximum refined by golden section).
 *  - bandwidth: first ω where |T(jω)| falls to |T(0)|/√2 (−3 dB relative to the DC value).
 * A quantity that does not exist is null (no phase crossover → gainMargin null, i.e. infinite).
 */
export interface LoopMargins {
  gainMargin: number | null;
  gainMarginDb: number | null;
  phaseCrossover: number | null;
  lowerGainMargin: number | null;
  lowerGainMarginDb: number | null;
  lowerPhaseCrossover: number | null;
  phaseMarginDeg: number | null;
  gainCrossover: number | null;
  delayMargin: number | null;
  peakSensitivity: number | null;
  peakSensitivityFrequency: number | null;
  peakComplementary: number | null;
  peakComplementaryFrequency: number | null;
  bandwidth: number | null;
  closedLoopStable: boolean;
  closedLoopPoles: Complex[];
  /** Order (n, n) of the Padé approximant used for the dead time in the closed-loop poles; null without dead time. */
  padeOrder: number | null;
  gainCrossovers: number[];
  phaseCrossovers: number[];
  /** One entry per gain crossover, ascending ω. */
  gainCrossoverDetails: { omega: number; phaseMarginDeg: number; delayMargin: number }[];
  /** One entry per phase crossover, ascending ω: the gain factor 1/|L| that reaches −1 there. */
  phaseCrossoverDetails: { omega: number; gainFactor: number; phaseDeg: number }[];
}

export interface MarginOptions {
  /** Padé order for the closed-loop poles of a loop with dead time (default: the smallest within 1° of the delay's phase up to twice the highest crossover, at least 3; capped by MAX_ORDER). */
  padeOrder?: number;
  /** Sweep limits (rad/s); by default decades around the poles, zeros and 1/T, widened until |L| has crossed 1. */
  omegaMin?: number;
  omegaMax?: number;
  /** Points per decade of the bracketing sweep (default 200). */
  pointsPerDecade?: number;
}

const DEG = 180 / Math.PI;
const STABLE_TOL = 1e-9;

export function loopMargins(L: TransferFunction, opts: MarginOptions = {}): LoopMargins {
  const num = P.trim(L.rational.num);
  const den = P.trim(L.rational.den);
  const g = frequencyEvaluator(L);
  const verdict = (orderHint: number) => {
    const { poles, padeOrder } = closedLoopPolesOf(num, den, L.delay, opts.padeOrder ?? orderHint);
    return { closedLoopPoles: poles, padeOrder, closedLoopStable: poles.every((p) => p.re < -STABLE_TOL * (1 + cabs(p))) };
  };
  const empty: LoopMargins = {
    gainMargin: null,
    gainMarginDb: null,
    phaseCrossover: null,
    lowerGainMargin: null,
    lowerGainMarginDb: null,
    lowerPhaseCrossover: null,
    phaseMarginDeg: null,
    gainCrossover: null,
    delayMargin: null,
    peakSensitivity: null,
    peakSensitivityFrequency: null,
    peakComplementary: null,
    peakComplementaryFrequency: null,
    bandwidth: null,
    closedLoopStable: false,
    closedLoopPoles: [],
    padeOrder: null,
    gainCrossovers: [],
    phaseCrossovers: [],
    gainCrossoverDetails: [],
    phaseCrossoverDetails: [],
  };
  if (num.length === 0) return { ...empty, ...verdict(1), peakSensitivity: 1, peakSensitivityFrequency: 0, peakComplementary: 0, peakComplementaryFrequency: 0 };

  const grid = sweepGrid(L, g, opts);
  const n = grid.length;
  const mag = new Float64Array(n);
  const ph = new Float64Array(n);
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = g(grid[i]);
    mag[i] = v.mag;
    ph[i] = v.phaseDeg;
    re[i] = v.re;
    im[i] = v.im;
  }

  // Gain crossovers: sign changes of ln|L|, refined by bisection in log ω on the exact |L(jω)|.
  const gainCrossoverDetails: LoopMargins['gainCrossoverDetails'] = [];
  for (let i = 0; i + 1 < n; i++) {
    const a = mag[i] - 1;
    const b = mag[i + 1] - 1;
    if (!(Number.isFinite(a) && Number.isFinite(b))) continue;
    if (a === 0 || (a > 0) !== (b > 0) && b !== 0) {
      const w = a === 0 ? grid[i] : refineLog(grid[i], grid[i + 1], (x) => Math.log(g(x).mag));
      const phase = g(w).phaseDeg;
      const pm = wrap180(180 + phase);
      gainCrossoverDetails.push({ omega: w, phaseMarginDeg: pm, delayMargin: pm / DEG / w });
    }
  }

  // Phase crossovers: the continuous phase passes a level −180° + k·360°.
  const phaseCrossoverDetails: LoopMargins['phaseCrossoverDetails'] = [];
  const v0 = dcValue(num, den);
  if (v0 !== null && v0 < 0) phaseCrossoverDetails.push({ omega: 0, gainFactor: 1 / Math.abs(v0), phaseDeg: g(0).phaseDeg });
  for (let i = 0; i + 1 < n; i++) {
    const pa = ph[i];
    const pb = ph[i + 1];
    if (!Number.isFinite(pa) || !Number.isFinite(pb)) continue;
    // Crossovers where |L| < 1e−6 (a gain factor above 10⁶, 120 dB) are not sought: far above
    // every breakpoint a dead time adds one every 2π/T rad/s and none of them matters.
    if (mag[i] < 1e-6 && mag[i + 1] < 1e-6) continue;
    const lo = Math.min(pa, pb);
    const hi = Math.max(pa, pb);
    // Levels ℓ with lo < ℓ ≤ hi (a level met exactly at a grid point counts once).
    for (let k = Math.floor((lo + 180) / 360) + 1; -180 + 360 * k <= hi; k++) {
      const level = -180 + 360 * k;
      const w = level === pb ? grid[i + 1] : refineLog(grid[i], grid[i + 1], (x) => g(x).phaseDeg - level);
      const v = g(w);
      // A phase jump at a pole or zero on the jω axis is not a crossover: reject it.
      if (!(v.mag > 0 && Number.isFinite(v.mag)) || Math.abs(v.im) > 1e-6 * v.mag || v.re >= 0) continue;
      phaseCrossoverDetails.push({ omega: w, gainFactor: 1 / v.mag, phaseDeg: v.phaseDeg });
    }
  }

  let upper: { omega: number; gainFactor: number } | null = null;
  let lower: { omega: number; gainFactor: number } | null = null;
  for (const p of phaseCrossoverDetails) {
    if (p.gainFactor >= 1 && (!upper || p.gainFactor < upper.gainFactor)) upper = p;
    if (p.gainFactor < 1 && (!lower || p.gainFactor > lower.gainFactor)) lower = p;
  }
  let worst: (typeof gainCrossoverDetails)[number] | null = null;
  for (const c of gainCrossoverDetails) if (!worst || c.phaseMarginDeg < worst.phaseMarginDeg) worst = c;

  const sVals = Array.from(grid, (_w, i) => 1 / Math.hypot(1 + re[i], im[i]));
  const tVals = Array.from(grid, (_w, i) => mag[i] / Math.hypot(1 + re[i], im[i]));
  const s = peakOf(grid, sVals, (w) => {
    const v = g(w);
    return 1 / Math.hypot(1 + v.re, v.im);
  });
  const t = peakOf(grid, tVals, (w) => {
    const v = g(w);
    return v.mag / Math.hypot(1 + v.re, v.im);
  });

  // Padé order: the smallest whose phase stays within 1° of the dead time up to twice the highest
  // crossover (lti-core's padeOrderFor), at least 3; an explicit opts.padeOrder wins.
  const wRef = 2 * Math.max(1e-12, ...gainCrossoverDetails.map((c) => c.omega), upper ? upper.omega : 0);
  const hint = L.delay > 0 ? Math.max(3, padeOrderFor(L.delay, wRef)) : 1;
  const stability = verdict(hint);
  if (stability.closedLoopStable) {
    for (const c of gainCrossoverDetails) c.delayMargin = (lag360(c.phaseMarginDeg) / DEG) / c.omega;
  }
  const delayMargin = gainCrossoverDetails.length ? Math.min(...gainCrossoverDetails.map((c) => c.delayMargin)) : null;
  return {
    ...empty,
    ...stability,
    gainMargin: upper ? upper.gainFactor : null,
    gainMarginDb: upper ? 20 * Math.log10(upper.gainFactor) : null,
    phaseCrossover: upper ? upper.omega : null,
    lowerGainMargin: lower ? lower.gainFactor : null,
    lowerGainMarginDb: lower ? 20 * Math.log10(lower.gainFactor) : null,
    lowerPhaseCrossover: lower ? lower.omega : null,
    phaseMarginDeg: worst ? worst.phaseMarginDeg : null,
    gainCrossover: worst ? worst.omega : null,
    delayMargin,
    peakSensitivity: s.value,
    peakSensitivityFrequency: s.omega,
    peakComplementary: t.value,
    peakComplementaryFrequency: t.omega,
    bandwidth: bandwidthOf(grid, tVals, g, num, den),
    gainCrossovers: gainCrossoverDetails.map((c) => c.omega),
    phaseCrossovers: phaseCrossoverDetails.map((c) => c.omega),
    gainCrossoverDetails,
    phaseCrossoverDetails,
  };
}

/** Closed-loop poles: roots of D·Dp + N·Np, where Np/Dp is the (n, n) Padé approximant of the dead time. */
export function closedLoopPolesOf(
  num: readonly number[],
  den: readonly number[],
  delay: number,
  order?: number,
): { poles: Complex[]; padeOrder: number | null } {
  let cn: number[] = P.trim(num);
  let cd: number[] = P.trim(den);
  let padeOrder: number | null = null;
  if (delay > 0 && cn.length > 0) {
    const room = MAX_ORDER - Math.max(cd.length, cn.length) + 1;
    const want = order ?? 6;
    if (!Number.isInteger(want) || want < 1 || want > MAX_PADE_ORDER) {
      throw new InputError(`Padé order must be a whole number from 1 to ${MAX_PADE_ORDER}, got ${want}`, { field: 'padeOrder' });
    }
    padeOrder = Math.max(1, Math.min(want, room));
    const pd = padeDelay(delay, padeOrder);
    cn = P.mul(cn, pd.num);
    cd = P.mul(cd, pd.den);
  }
  const ch = P.add(cd, cn);
  if (ch.length === 0) throw new InputError('the closed-loop characteristic polynomial 1 + L is identically zero');
  return { poles: ch.length > 1 ? polyRoots(ch) : [], padeOrder };
}

function dcValue(num: readonly number[], den: readonly number[]): number | null {
  const d0 = den[0] ?? 0;
  if (d0 === 0) return null;
  return (num[0] ?? 0) / d0;
}

/** An angle reduced to [0°, 360°): the lag still available before the phase reaches −180° (mod 360°). */
const lag360 = (deg: number): number => ((deg % 360) + 360) % 360;

const wrap180 = (deg: number): number => {
  let x = deg % 360;
  if (x <= -180) x += 360;
  if (x > 180) x -= 360;
  return x;
};

/**
 * A sign change of f between a and b, refined in log ω by the Illinois variant of regula falsi
 * (superlinear on smooth f), with a bisection step whenever an iteration fails to halve the
 * bracket, so it never does worse than bisection; stops at full double precision.
 */
function refineLog(a: number, b: number, f: (w: number) => number): number {
  let xa = Math.log(a);
  let xb = Math.log(b);
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  let side = 0;
  for (let it = 0; it < 100; it++) {
    const width = xb - xa;
    let x = (xa * fb - xb * fa) / (fb - fa);
    if (!(x > xa && x < xb)) x = 0.5 * (xa + xb);
    const fx = f(Math.exp(x));
    if (fx === 0 || !Number.isFinite(fx)) return Math.exp(x);
    if (fx > 0 === fa > 0) {
      xa = x;
      fa = fx;
      if (side === -1) fb /= 2;
      side = -1;
    } else {
      xb = x;
      fb = fx;
      if (side === 1) fa /= 2;
      side = 1;
    }
    if (xb - xa > 0.5 * width) {
      const xm = 0.5 * (xa + xb);
      const fm = f(Math.exp(xm));
      if (fm === 0) return Math.exp(xm);
      if (fm > 0 === fa > 0) {
        xa = xm;
        fa = fm;
      } else {
        xb = xm;
        fb = fm;
      }
      side = 0;
    }
    if (xb - xa <= 4e-16 * Math.max(1, Math.abs(xa))) break;
  }
  return Math.exp(Math.abs(fa) < Math.abs(fb) ? xa : xb);
}

/** Maximum of f over the grid, each of the three largest local maxima refined by golden section in log ω. */
function peakOf(grid: readonly number[], vals: readonly number[], f: (w: number) => number): { value: number; omega: number } {
  const cands: number[] = [];
  for (let i = 0; i < vals.length; i++) {
    const l = i > 0 ? vals[i - 1] : -Infinity;
    const r = i + 1 < vals.length ? vals[i + 1] : -Infinity;
    if (vals[i] >= l && vals[i] >= r) cands.push(i);
  }
  cands.sort((a, b) => vals[b] - vals[a]);
  let best = { value: vals[cands[0]] ?? NaN, omega: grid[cands[0]] ?? NaN };
  for (const i of cands.slice(0, 3)) {
    if (!Number.isFinite(vals[i])) return { value: Infinity, omega: grid[i] };
    const a = Math.log(grid[Math.max(0, i - 1)]);
    const b = Math.log(grid[Math.min(grid.length - 1, i + 1)]);
    const r = goldenMax(a, b, (x) => f(Math.exp(x)));
    if (r.value > best.value) best = { value: r.value, omega: Math.exp(r.x) };
    if (vals[i] > best.value) best = { value: vals[i], omega: grid[i] };
  }
  return best;
}

function goldenMax(a: number, b: number, f: (x: number) => number): { x: number; value: number } {
  const phi = (Math.sqrt(5) - 1) / 2;
  let x1 = b - phi * (b - a);
  let x2 = a + phi * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let it = 0; it < 80 && b - a > 1e-13; it++) {
    if (f1 >= f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - phi * (b - a);
      f1 = f(x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + phi * (b - a);
      f2 = f(x2);
    }
  }
  return f1 >= f2 ? { x: x1, value: f1 } : { x: x2, value: f2 };
}

function bandwidthOf(grid: readonly number[], tVals: readonly number[], g: FrequencyEvaluator, num: readonly number[], den: readonly number[]): number | null {
  const v0 = dcValue(num, den);
  // Integrators in L make T(0) = 1; otherwise T(0) = L(0)/(1 + L(0)).
  const t0 = v0 === null ? (num[0] ?? 0) === 0 && den[0] === 0 ? NaN : 1 : Math.abs(v0 / (1 + v0));
  if (!Number.isFinite(t0) || t0 === 0) return null;
  const level = t0 / Math.SQRT2;
  const tAt = (w: number) => {
    const v = g(w);
    return v.mag / Math.hypot(1 + v.re, v.im);
  };
  for (let i = 0; i < grid.length; i++) {
    if (tVals[i] < level) return i === 0 ? null : refineLog(grid[i - 1], grid[i], (x) => tAt(x) - level);
  }
  return null;
}

/**
 * The bracketing sweep: log-spaced (pointsPerDecade), with extra points around every lightly
 * damped pole/zero pair (so a narrow resonance cannot hide two crossovers inside one step), and
 * with dead time a linear spacing cap of π/(8T) up to ωT = 20 so the phase moves < 22.5° per step.
 */
function sweepGrid(L: TransferFunction, g: FrequencyEvaluator, opts: MarginOptions): number[] {
  let [lo, hi] = frequencyRange(L, 2);
  if (opts.omegaMin !== undefined) lo = opts.omegaMin;
  else {
    for (let i = 0; i < 8 && g.integrators > 0 && g(lo).mag < 10; i++) lo /= 10;
  }
  if (opts.omegaMax !== undefined) hi = opts.omegaMax;
  else {
    for (let i = 0; i < 8 && g(hi).mag > 0.1; i++) hi *= 10;
  }
  if (!(lo > 0 && hi > lo)) throw new InputError(`frequency sweep limits must satisfy 0 < omegaMin < omegaMax, got ${lo} and ${hi}`);
  const perDecade = opts.pointsPerDecade ?? 200;
  const ratio = 10 ** (1 / perDecade);
  const T = L.delay;
  const linCap = T > 0 ? Math.PI / (8 * T) : Infinity;
  // Beyond ωT = 20 the cap is dropped: there the phase falls monotonically (the delay dominates
  // the bounded rational part), and every level between a step's end phases is still found.
  const linLimit = T > 0 ? 20 / T : 0;
  const pts: number[] = [];
  for (let w = lo; w < hi; ) {
    pts.push(w);
    const step = w < linLimit ? Math.min(w * (ratio - 1), linCap) : w * (ratio - 1);
    w += step;
  }
  pts.push(hi);
  for (const r of [...g.poles, ...g.zeros]) {
    const w0 = Math.abs(r.im);
    if (w0 === 0) continue;
    const zeta = Math.abs(r.re) / cabs(r);
    if (zeta > 0.2) continue;
    const width = Math.max(zeta, 1e-9) * w0;
    for (const k of [-8, -4, -2, -1, -0.5, 0, 0.5, 1, 2, 4, 8]) {
      const w = w0 + k * width;
      if (w > lo && w < hi) pts.push(w);
    }
  }
  pts.sort((a, b) => a - b);
  return pts;
}


/** The scalar figures of a LoopMargins as plain, serialisable data (CLI JSON, worker messages, tables). */
export type MarginFigures = Omit<LoopMargins, 'closedLoopPoles' | 'padeOrder' | 'gainCrossoverDetails' | 'phaseCrossoverDetails'>;

export function marginFigures(m: LoopMargins): MarginFigures {
  return {
    gainMargin: m.gainMargin,
    gainMarginDb: m.gainMarginDb,
    phaseCrossover: m.phaseCrossover,
    lowerGainMargin: m.lowerGainMargin,
    lowerGainMarginDb: m.lowerGainMarginDb,
    lowerPhaseCrossover: m.lowerPhaseCrossover,
    phaseMarginDeg: m.phaseMarginDeg,
    gainCrossover: m.gainCrossover,
    delayMargin: m.delayMargin,
    peakSensitivity: m.peakSensitivity,
    peakSensitivityFrequency: m.peakSensitivityFrequency,
    peakComplementary: m.peakComplementary,
    peakComplementaryFrequency: m.peakComplementaryFrequency,
    bandwidth: m.bandwidth,
    closedLoopStable: m.closedLoopStable,
    gainCrossovers: [...m.gainCrossovers],
    phaseCrossovers: [...m.phaseCrossovers],
  };
}
