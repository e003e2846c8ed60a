import {
  type Complex,
  type LoopMargins,
  type MarginFigures,
  cabs,
  loopMargins,
  marginFigures,
  poly as P,
  polyRootsDetailed,
} from '@loopwright/lti';
import type { DiscreteTransferFunction } from './discrete.ts';
import { type JuryResult, juryTest } from './jury.ts';
import { type SampleRateNote, sampleRateCheck } from './sample-rate.ts';
import { type SampledLoop, continuousLoopOf, holdAsDelay, loopPulseTransfer } from './sampled-loop.ts';
import { bisectRoot, goldenSectionMax } from './search.ts';
import { type UnitCircleEvaluator, sampledFrequencyGrid, unitCircleEvaluator } from './unit-circle.ts';

const DEG = 180 / Math.PI;
const STABLE_TOL = 1e-9;

/**
 * Margins of a sampled loop from its exact pulse transfer function G(z) on the unit circle
 * z = e^(jωT), 0 ≤ ω ≤ π/T, with the same fields and definitions as the continuous margins
 * (lti `LoopMargins`): every gain and phase crossover (one may sit exactly at the Nyquist
 * frequency, where G(−1) is real), GM and the lower GM, PM, DM, Ms, Mt, bandwidth; closed-loop
 * poles are z-plane poles (stable ⇔ all |z| < 1) with the Jury test beside them.
 *
 * The delay margin is read as PMᵢ/ωᵢ, exact for an extra delay of whole samples (z^(−m) has the
 * phase −mωT); for other extra dead times it is the usual estimate (aliased terms shift
 * differently) — `sampledDelayMargin` finds the exact one.
 */
export interface SampledMargins extends Omit<LoopMargins, 'notes'> {
  sampleTime: number;
  computeDelay: number;
  /** π/T (rad/s): the response is computed up to here. */
  nyquistFrequency: number;
  /** The loop's pulse transfer function (z-plane). */
  pulse: DiscreteTransferFunction;
  /** Jury test of the closed-loop characteristic polynomial den + num. */
  jury: JuryResult;
  /** Margins of the continuous loop with the hold taken as e^(−sT/2) and the delay as e^(−sDT): an estimate. */
  continuousEstimate: { label: string; margins: LoopMargins } | null;
  /** Margins of the continuous loop without any sampling (for comparison), when known. */
  continuous: LoopMargins | null;
  /** Sample time against the crossover (see sample-rate.ts); empty when fine. */
  notes: SampleRateNote[];
}

export interface SampledMarginOptions {
  /** Points per decade of the log part of the bracketing grid (default 200). */
  pointsPerDecade?: number;
}

export const CONTINUOUS_ESTIMATE_LABEL =
  'continuous estimate (hold as e^(−sT/2), computation delay as dead time): an approximation, not the sampled loop';

export function sampledMargins(loop: SampledLoop, opts: SampledMarginOptions = {}): SampledMargins {
  const pulse = loopPulseTransfer(loop);
  const T = pulse.sampleTime;
  const D = loop.computeDelay ?? 0;
  const core = pulseMargins(pulse, opts);
  const Lc = continuousLoopOf(loop);
  const continuous = Lc ? loopMargins(Lc) : null;
  const estimate = Lc ? { label: CONTINUOUS_ESTIMATE_LABEL, margins: loopMargins(holdAsDelay(Lc, T, D)) } : null;
  // The guideline is stated for the continuous design's crossover; without one, the sampled loop's.
  const wc =
    continuous && continuous.gainCrossovers.length
      ? Math.max(...continuous.gainCrossovers)
      : core.gainCrossovers.length
        ? Math.max(...core.gainCrossovers)
        : null;
  const note = sampleRateCheck(wc, T, D);
  return { ...core, computeDelay: D, continuousEstimate: estimate, continuous, notes: note ? [note] : [] };
}

/** Margins of a loop given directly by its pulse transfer function G(z) (characteristic equation 1 + G = 0). */
export function pulseMargins(
  pulse: DiscreteTransferFunction,
  opts: SampledMarginOptions = {},
): Omit<SampledMargins, 'computeDelay' | 'continuousEstimate' | 'continuous' | 'notes'> {
  const T = pulse.sampleTime;
  const wN = Math.PI / T;
  const num = P.trim(pulse.rational.num);
  const den = P.trim(pulse.rational.den);
  const ch = P.add(den, num);
  const roots = ch.length > 1 ? polyRootsDetailed(ch) : null;
  const closedLoopPoles: Complex[] = roots ? roots.roots : [];
  const closedLoopStable = closedLoopPoles.every((z) => cabs(z) < 1 - STABLE_TOL);
  const jury = juryTest(ch);
  const base = {
    sampleTime: T,
    nyquistFrequency: wN,
    pulse,
    jury,
    closedLoopPoles,
    closedLoopStable,
    padeOrder: null,
    // Six digits, as for continuous closed-loop poles (lti closed-loop.ts).
    closedLoopAccuracy: {
      worstRelativeError: roots ? roots.worstRelativeError : 0,
      limited: roots ? roots.worstRelativeError > 1e-6 : false,
    },
    // G(z) is rational in z and evaluated exactly on the unit circle; no crossover tail (the band ends at π/T).
    frequencyMethod: 'rational' as const,
    phaseCrossoverTail: null,
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
    gainCrossovers: [] as number[],
    phaseCrossovers: [] as number[],
    gainCrossoverDetails: [] as LoopMargins['gainCrossoverDetails'],
    phaseCrossoverDetails: [] as LoopMargins['phaseCrossoverDetails'],
  };
  if (num.length === 0)
    return { ...base, peakSensitivity: 1, peakSensitivityFrequency: 0, peakComplementary: 0, peakComplementaryFrequency: 0 };

  const g = unitCircleEvaluator(pulse);
  const grid = sampledFrequencyGrid(g, opts.pointsPerDecade ?? 200);
  const pts = grid.map((w) => g(w));

  // Gain crossovers: sign changes of ln|G|.
  const gainCrossoverDetails: LoopMargins['gainCrossoverDetails'] = [];
  for (let i = 0; i + 1 < grid.length; i++) {
    const a = Math.log(pts[i].mag);
    const b = Math.log(pts[i + 1].mag);
    if (!Number.isFinite(a) || !Number.isFinite(b)) continue;
    if (a === 0 || (a > 0 !== b > 0 && b !== 0)) {
      const w = a === 0 ? grid[i] : bisectRoot(grid[i], grid[i + 1], (x) => Math.log(g(x).mag));
      const pm = wrap180(180 + g(w).phaseDeg);
      gainCrossoverDetails.push({ omega: w, phaseMarginDeg: pm, delayMargin: pm / DEG / w });
    }
  }
  if (pts.length && Math.log(pts[pts.length - 1].mag) === 0 && !gainCrossoverDetails.some((c) => c.omega === wN)) {
    const pm = wrap180(180 + pts[pts.length - 1].phaseDeg);
    gainCrossoverDetails.push({ omega: wN, phaseMarginDeg: pm, delayMargin: pm / DEG / wN });
  }

  // Phase crossovers: the continuous phase passes −180° + k·360°; the ends ω = 0 and ω = π/T
  // are crossovers where G is real and negative there.
  const phaseCrossoverDetails: LoopMargins['phaseCrossoverDetails'] = [];
  const at1 = realValue(num, den, 1);
  if (at1 !== null && at1 < 0) phaseCrossoverDetails.push({ omega: 0, gainFactor: 1 / Math.abs(at1), phaseDeg: g(0).phaseDeg });
  for (let i = 0; i + 1 < grid.length; i++) {
    const pa = pts[i].phaseDeg;
    const pb = pts[i + 1].phaseDeg;
    if (!Number.isFinite(pa) || !Number.isFinite(pb)) continue;
    if (pts[i].mag < 1e-6 && pts[i + 1].mag < 1e-6) continue; // a gain factor above 10⁶ matters to no one
    const lo = Math.min(pa, pb);
    const hi = Math.max(pa, pb);
    for (let k = Math.floor((lo + 180) / 360) + 1; -180 + 360 * k <= hi; k++) {
      const level = -180 + 360 * k;
      if (level === pb && i + 1 === grid.length - 1) continue; // the Nyquist end is handled exactly below
      const w = level === pb ? grid[i + 1] : bisectRoot(grid[i], grid[i + 1], (x) => g(x).phaseDeg - level);
      const v = g(w);
      if (!(v.mag > 0 && Number.isFinite(v.mag)) || Math.abs(v.im) > 1e-6 * v.mag || v.re >= 0) continue;
      phaseCrossoverDetails.push({ omega: w, gainFactor: 1 / v.mag, phaseDeg: v.phaseDeg });
    }
  }
  const atN = realValue(num, den, -1);
  if (atN !== null && atN < 0) {
    const dup = phaseCrossoverDetails.findIndex((c) => Math.abs(c.omega - wN) <= 1e-9 * wN);
    if (dup >= 0) phaseCrossoverDetails.splice(dup, 1);
    phaseCrossoverDetails.push({ omega: wN, gainFactor: 1 / Math.abs(atN), phaseDeg: g(wN).phaseDeg });
  }
  phaseCrossoverDetails.sort((a, b) => a.omega - b.omega);

  let upper: (typeof phaseCrossoverDetails)[number] | null = null;
  let lower: (typeof phaseCrossoverDetails)[number] | null = null;
  for (const p of phaseCrossoverDetails) {
    if (p.gainFactor >= 1 && (!upper || p.gainFactor < upper.gainFactor)) upper = p;
    if (p.gainFactor < 1 && (!lower || p.gainFactor > lower.gainFactor)) lower = p;
  }
  if (closedLoopStable) for (const c of gainCrossoverDetails) c.delayMargin = lag360(c.phaseMarginDeg) / DEG / c.omega;
  let worst: (typeof gainCrossoverDetails)[number] | null = null;
  for (const c of gainCrossoverDetails) if (!worst || c.phaseMarginDeg < worst.phaseMarginDeg) worst = c;

  const sens = (w: number) => {
    const v = g(w);
    return 1 / Math.hypot(1 + v.re, v.im);
  };
  const comp = (w: number) => {
    const v = g(w);
    return v.mag / Math.hypot(1 + v.re, v.im);
  };
  const s = peak(
    grid,
    pts.map((v) => 1 / Math.hypot(1 + v.re, v.im)),
    sens,
  );
  const t = peak(
    grid,
    pts.map((v) => v.mag / Math.hypot(1 + v.re, v.im)),
    comp,
  );

  return {
    ...base,
    gainMargin: upper ? upper.gainFactor : null,
    gainMarginDb: upper ? 20 * Math.log10(upper.gainFactor) : null,
    phaseCrossover: upper ? upper.omega : null,
    lowerGainMargin: lower ? lower.gainFactor : null,
    lowerGainMarginDb: lower ? 20 * Math.log10(lower.gainFactor) : null,
    lowerPhaseCrossover: lower ? lower.omega : null,
    phaseMarginDeg: worst ? worst.phaseMarginDeg : null,
    gainCrossover: worst ? worst.omega : null,
    delayMargin: gainCrossoverDetails.length ? Math.min(...gainCrossoverDetails.map((c) => c.delayMargin)) : null,
    peakSensitivity: s.value,
    peakSensitivityFrequency: s.omega,
    peakComplementary: t.value,
    peakComplementaryFrequency: t.omega,
    bandwidth: bandwidth(grid, pts, g, num, den),
    gainCrossovers: gainCrossoverDetails.map((c) => c.omega),
    phaseCrossovers: phaseCrossoverDetails.map((c) => c.omega),
    gainCrossoverDetails,
    phaseCrossoverDetails,
  };
}

/** The scalar figures of sampled margins as plain data: those of continuous margins plus the sampling fields. */
export type SampledMarginFigures = MarginFigures & { sampleTime: number; computeDelay: number; nyquistFrequency: number };

export function sampledMarginFigures(m: SampledMargins): SampledMarginFigures {
  return {
    ...marginFigures({ ...m, notes: m.notes.map((n) => n.message) }),
    sampleTime: m.sampleTime,
    computeDelay: m.computeDelay,
    nyquistFrequency: m.nyquistFrequency,
  };
}

/** G at a real z (±1): null at a pole. */
function realValue(num: readonly number[], den: readonly number[], z: number): number | null {
  const d = P.evalReal(den, z);
  if (d === 0) return null;
  return P.evalReal(num, z) / d;
}

const lag360 = (deg: number): number => ((deg % 360) + 360) % 360;
const wrap180 = (deg: number): number => {
  let x = deg % 360;
  if (x <= -180) x += 360;
  if (x > 180) x -= 360;
  return x;
};

/** Largest grid value, its three largest local maxima refined by golden section between neighbours. */
function peak(grid: readonly number[], vals: readonly number[], f: (w: number) => number): { value: number; omega: number } {
  const cands: number[] = [];
  for (let i = 0; i < vals.length; i++) {
    if (vals[i] >= (i > 0 ? vals[i - 1] : -Infinity) && vals[i] >= (i + 1 < vals.length ? vals[i + 1] : -Infinity)) cands.push(i);
  }
  cands.sort((a, b) => vals[b] - vals[a]);
  let best = { value: vals[cands[0]] ?? NaN, omega: grid[cands[0]] ?? NaN };
  for (const i of cands.slice(0, 3)) {
    if (!Number.isFinite(vals[i])) return { value: Infinity, omega: grid[i] };
    const r = goldenSectionMax(grid[Math.max(0, i - 1)], grid[Math.min(grid.length - 1, i + 1)], f);
    if (r.value > best.value) best = { value: r.value, omega: r.x };
  }
  return best;
}

/** First ω where |T(e^(jωT))| falls to |T(1)|/√2; null when it stays above up to the Nyquist frequency. */
function bandwidth(
  grid: readonly number[],
  pts: readonly { re: number; im: number; mag: number }[],
  g: UnitCircleEvaluator,
  num: readonly number[],
  den: readonly number[],
): number | null {
  const v1 = realValue(num, den, 1);
  const t0 = v1 === null ? 1 : Math.abs(v1 / (1 + v1));
  if (!Number.isFinite(t0) || t0 === 0) return null;
  const level = t0 / Math.SQRT2;
  const tAt = (w: number) => {
    const v = g(w);
    return v.mag / Math.hypot(1 + v.re, v.im);
  };
  for (let i = 0; i < grid.length; i++) {
    const ti = pts[i].mag / Math.hypot(1 + pts[i].re, pts[i].im);
    if (ti < level) return i === 0 ? null : bisectRoot(grid[i - 1], grid[i], (x) => tAt(x) - level);
  }
  return null;
}
