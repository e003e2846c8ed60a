import { type Complex, cabs, cx } from './complex.ts';
import { InputError, MAX_ORDER } from './errors.ts';
import { polyRootsDetailed } from './roots.ts';
import { deadlineTicker } from './budget.ts';
import { type FrequencyEvaluator, frequencyEvaluator, frequencyRange, unwrapAlong } from './frequency.ts';
import * as P from './poly.ts';
import type { TransferFunction } from './transfer.ts';
import { padeOrderFor } from './pade.ts';
import { closedLoopPolesDetailed } from './closed-loop.ts';

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
 *  - phase crossover ω_pc: ∠L(jω) = −180° + k·360°; each gives the factor 1/|L(jω_pc)| that
 *    moves the curve onto −1. Gain margin = the smallest factor above 1; lower gain margin = the
 *    largest factor below 1 (conditionally stable loops).
 *  - Ms = max |1/(1 + L)|, Mt = max |L/(1 + L)| over ω (grid maximum refined by Brent's parabolic search).
 *  - bandwidth: first ω where |T(jω)| falls to |T(0)|/√2 (−3 dB relative to the DC value).
 * A quantity that does not exist is null (no phase crossover → gainMargin null, i.e. infinite).
 *
 * Every search ends. A rational loop has finitely many crossovers and all are found. A loop
 * with dead time has infinitely many phase crossovers (one every 2π/T rad/s at high frequency):
 * the first `maxListedCrossovers` (100) are listed, the rest are counted up to the end of the
 * sweep and described (`phaseCrossoverTail`), and the crossovers among them that decide the
 * gain margins — next to the extremes of |L| — are located, so the margins stay exact.
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
  /** One entry per listed phase crossover, ascending ω: the gain factor 1/|L| that reaches −1 there. */
  phaseCrossoverDetails: { omega: number; gainFactor: number; phaseDeg: number }[];
  /** The phase crossovers that are not listed (a loop with dead time has infinitely many); null when all are listed. */
  phaseCrossoverTail: PhaseCrossoverTail | null;
  /** How far the closed-loop poles can be trusted. */
  closedLoopAccuracy: { worstRelativeError: number; limited: boolean };
  /** How L(jω) was evaluated: 'rational' (no dead time), 'exact' (dead time as e^(−jωT)), or as the caller says. */
  frequencyMethod: 'rational' | 'exact' | 'pade';
  /** Plain statements for the CLI and the editor (truncated lists, limits approached, accuracy). */
  notes: string[];
}

export interface PhaseCrossoverTail {
  /** Every phase crossover below this frequency is listed (rad/s). */
  listedBelow: number;
  /** How many more lie from `listedBelow` to `countedTo` (null when too many to count in floating point). */
  count: number | null;
  countedTo: number;
  /** More lie above `countedTo`: with dead time there are infinitely many. */
  infiniteBeyond: boolean;
  /** Spacing of the crossovers far above every pole and zero: 2π/T (rad/s); null without dead time. */
  spacing: number | null;
  /** Range of the gain factor 1/|L| over the unlisted crossovers (from the magnitude envelope). */
  gainFactorMin: number;
  gainFactorMax: number;
  /** Unlisted crossovers located because they decide a gain margin (next to an extreme of |L|). */
  deciding: { omega: number; gainFactor: number; phaseDeg: number }[];
}

export interface MarginOptions {
  /** Padé order for the closed-loop poles of a loop with dead time (default: the smallest within 1° of the delay's phase up to twice the highest crossover, at least 3; capped by MAX_ORDER). */
  padeOrder?: number;
  /** Sweep limits (rad/s); by default decades around the poles, zeros and 1/T, widened until |L| has crossed 1. */
  omegaMin?: number;
  omegaMax?: number;
  /** Points per decade of the bracketing sweep (default 200). */
  pointsPerDecade?: number;
  /** Most phase crossovers listed (default 100); the rest are counted and described. */
  maxListedCrossovers?: number;
  /** Deadline on the performance.now() clock (ms): past it the analysis stops with a BudgetError('time'). */
  deadline?: number;
  /**
   * Bracketing points to use instead of building them (ascending): the sweep keeps its own limits
   * and takes the points between them from here. The caller promises they are at least as dense
   * as the sweep's own everywhere in the range (the grid of a live sweep, fixed once per edit,
   * whose exact values are tabulated). Ignored unless it covers the sweep's limits.
   */
  gridFrom?: Float64Array | readonly number[];
}

/**
 * A loop given by an exact evaluator of L(jω) and a transfer function that stands for it where
 * one is needed (grid, low-frequency phase anchor, closed-loop poles): used for a cut of a
 * diagram whose inner loops hold dead times (the evaluator solves the diagram at s = jω, the
 * transfer function has Padé approximants in the inner loops).
 */
export interface LoopSource {
  /** Stands in for L where poles are needed; its continuous phase guides the unwrapping. */
  approximant: TransferFunction;
  /** L(jω) exactly. */
  evaluate(omega: number): Complex;
  /** Sum of all dead times in the loop (s); those beyond the approximant's own dead time turn the
   *  exact phase away from the approximant's, which sets how finely it must be sampled. */
  delaySum: number;
}

const DEG = 180 / Math.PI;
const STABLE_TOL = 1e-12;
const DEFAULT_LISTED = 100;

/** Margins of a transfer function (dead time kept exact in every frequency figure). */
export function loopMargins(L: TransferFunction, opts: MarginOptions = {}): LoopMargins {
  return marginsOf(L, null, L.delay, 0, opts, L.delay > 0 ? 'exact' : 'rational');
}

/** Margins of a loop given by an exact evaluator and an approximant (see LoopSource). */
export function loopMarginsOf(source: LoopSource, opts: MarginOptions = {}): LoopMargins {
  const inner = Math.max(0, source.delaySum - source.approximant.delay);
  return marginsOf(source.approximant, source.evaluate, Math.max(source.delaySum, source.approximant.delay), inner, opts, 'exact');
}

/**
 * |x + jy|: the square root of the sum of squares where that neither overflows nor underflows
 * (Math.hypot, several times slower, otherwise).
 */
function modulus(x: number, y: number): number {
  const q = x * x + y * y;
  return q > 1e-300 && q < 1e300 ? Math.sqrt(q) : Math.hypot(x, y);
}

function marginsOf(
  L: TransferFunction,
  exact: ((omega: number) => Complex) | null,
  delayScale: number,
  innerDelay: number,
  opts: MarginOptions,
  method: LoopMargins['frequencyMethod'],
): LoopMargins {
  const ticker = deadlineTicker(opts.deadline, 'margins', 64);
  const num = P.trim(L.rational.num);
  const den = P.trim(L.rational.den);
  const g = frequencyEvaluator(L);
  const notes: string[] = [];
  const maxListed = opts.maxListedCrossovers ?? DEFAULT_LISTED;
  if (!Number.isInteger(maxListed) || maxListed < 1) {
    throw new InputError(`maxListedCrossovers must be a whole number ≥ 1, got ${maxListed}`, { field: 'maxListedCrossovers' });
  }
  // |L(∞)|: nonzero only for a biproper rational part.
  const atInfinity = num.length === den.length && num.length > 0 ? Math.abs(P.lead(num) / P.lead(den)) : 0;
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
    phaseCrossoverTail: null,
    closedLoopAccuracy: { worstRelativeError: 0, limited: false },
    frequencyMethod: method,
    notes,
  };
  const verdict = (orderHint: number, smallGain: boolean) => {
    const cl = closedLoopPolesDetailed(num, den, L.delay, opts.padeOrder ?? orderHint);
    // Stable: every pole in the open left half-plane by more than its own error and by more than
    // rounding relative to its size (a very long dead time gives genuinely slow, barely damped
    // poles such as −5e-15 ± 3e-5j, which an absolute tolerance would misjudge).
    let stable = cl.poles.every((p, i) => p.re < -Math.max(cl.errors[i], STABLE_TOL * cabs(p)));
    if (cl.limited)
      notes.push(`closed-loop poles are good to about ${cl.worstRelativeError.toExponential(0)} (relative): accuracy limited`);
    const doubtful = cl.poles.filter((p, i) => Math.abs(p.re) <= cl.errors[i] && cl.errors[i] > STABLE_TOL * cabs(p));
    if (doubtful.length)
      notes.push(`the verdict is uncertain: ${doubtful.length} closed-loop pole(s) lie within their error of the imaginary axis`);
    // A delay loop whose |L(jω)| does not fall below 1 at high frequency is of neutral type: its
    // characteristic roots form chains that approach Re s = ln|L(∞)|/T ≥ 0, which no Padé
    // approximant shows (its poles are all at moderate frequencies).
    if (smallGain && !stable) {
      // Small gain: an open-loop stable L with |L(jω)| < 1 at every ω > 0 (and 1 + L(0) ≠ 0)
      // cannot reach −1, whatever the dead time (Nyquist). Such a loop with a very long dead
      // time has closed-loop poles so close to the axis (Re ≈ −ω²/2T) that they round onto it.
      stable = true;
      notes.push(
        'stable for every dead time: the loop is open-loop stable and |L(jω)| < 1 at every ω > 0 (small gain); its slowest closed-loop poles lie within rounding of the imaginary axis',
      );
    }
    if (L.delay > 0 && atInfinity >= 1 - 1e-12) {
      stable = false;
      notes.push(
        `|L(jω)| tends to ${fmt(atInfinity)} at high frequency with dead time: infinitely many closed-loop poles approach Re s = ${fmt(Math.log(atInfinity) / L.delay)} — not stable (the Padé poles cannot show them)`,
      );
    }
    return {
      closedLoopPoles: cl.poles,
      padeOrder: cl.padeOrder,
      closedLoopStable: stable,
      closedLoopAccuracy: { worstRelativeError: cl.worstRelativeError, limited: cl.limited },
    };
  };
  if (num.length > den.length) {
    throw new InputError(
      `the loop L(s) is improper (numerator degree ${num.length - 1} > denominator degree ${den.length - 1}): its gain grows without bound with frequency; add poles, e.g. a derivative filter`,
      { field: 'loop' },
    );
  }
  if (num.length === 0) {
    return {
      ...empty,
      ...verdict(1, false),
      peakSensitivity: 1,
      peakSensitivityFrequency: 0,
      peakComplementary: 0,
      peakComplementaryFrequency: 0,
    };
  }

  // ——— the sweep: values and continuous phase on the bracketing grid
  const { grid, trackedTo } = sweepGrid(L, g, opts, delayScale, atInfinity, exact ? innerDelay : 0);
  const at = (w: number): Complex => (exact ? exact(w) : (({ re, im }) => cx(re, im))(g(w)));
  // The samples as columns (a sweep holds thousands of points): value, magnitude, continuous phase.
  const n = grid.length;
  const sRe = new Float64Array(n);
  const sIm = new Float64Array(n);
  const sMag = new Float64Array(n);
  const sPh = new Float64Array(n);
  const guide = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    ticker.tick();
    if (exact) {
      // The approximant's phase only guides the exact value's branch: its rough form does.
      guide[i] = g.phaseGuide(grid[i]);
      const v = exact(grid[i]);
      sRe[i] = v.re;
      sIm[i] = v.im;
      sMag[i] = modulus(v.re, v.im);
    } else {
      const gv = g(grid[i]);
      sPh[i] = gv.phaseDeg;
      sRe[i] = gv.re;
      sIm[i] = gv.im;
      sMag[i] = gv.mag;
    }
  }
  // Unwrap: the approximant's phase change predicts the exact one (they agree at low frequency).
  if (exact) unwrapAlong(sRe, sIm, guide, sPh);
  /** The continuous phase at ω inside [grid[i], grid[i+1]]: for an exact source, the branch the approximant's phase change from grid[i] predicts. */
  const phaseIn = (w: number, i: number): number => {
    if (!exact) return g(w).phaseDeg;
    const v = exact(w);
    const principal = Math.atan2(v.im, v.re) * DEG;
    const ref = sPh[i] + (g.phaseGuide(w) - guide[i]);
    return Number.isFinite(ref) ? principal + 360 * Math.round((ref - principal) / 360) : principal;
  };

  // ——— gain crossovers: sign changes of |L| − 1 (a band of ±1e-12 counts as "on 1")
  const gainCrossoverDetails: LoopMargins['gainCrossoverDetails'] = [];
  const side = (m: number) => (m > 1 + 1e-12 ? 1 : m < 1 - 1e-12 ? -1 : 0);
  let onOne = 0;
  let unphased = false;
  let lastSide = 0;
  let lastIdx = -1;
  for (let i = 0; i < n; i++) {
    const m = sMag[i];
    if (!Number.isFinite(m)) continue;
    const sd = side(m);
    if (sd === 0) {
      onOne++;
      continue;
    }
    if (lastSide !== 0 && sd !== lastSide) {
      ticker.tick();
      const w = refineLog(grid[lastIdx], grid[i], (x) => Math.log(cabs(at(x))));
      // The phase margin depends only on the principal angle (finite even where ω·T overflows).
      const v = at(w);
      const pm = wrap180(180 + Math.atan2(v.im, v.re) * DEG);
      if (!Number.isFinite(pm)) {
        // ω·T overflows there (a 1e308 s dead time): the phase has no floating-point value.
        if (!unphased) notes.push(`a gain crossover near ${fmt(w)} rad/s is not listed: ω·T overflows there, so its phase has no value`);
        unphased = true;
      } else if (gainCrossoverDetails.length < maxListed)
        gainCrossoverDetails.push({ omega: w, phaseMarginDeg: pm, delayMargin: pm / DEG / w });
    }
    lastSide = sd;
    lastIdx = i;
  }
  if (onOne === n) notes.push('|L(jω)| = 1 at every frequency: there is no isolated gain crossover, so no phase or delay margin');
  // A huge gain (1e300/(s + 1)) still has |L| > 1 where the sweep ends: its crossover lies above,
  // out of reach of the polynomial evaluation (ω² overflows past 1e154). Say so rather than
  // report "no gain crossover".
  const beyondSweep = atInfinity < 1 && !(sMag[n - 1] < 1);
  if (beyondSweep) {
    notes.push(
      `|L(jω)| is still ${fmt(sMag[n - 1])} at ${fmt(grid[n - 1])} rad/s, where the sweep ends: a gain crossover above it is not searched (phase margin, Ms and Mt not available)`,
    );
  }
  if (gainCrossoverDetails.length >= maxListed) notes.push(`gain crossovers: only the first ${maxListed} are listed`);

  // ——— phase crossovers: the continuous phase passes a level −180° + k·360°
  const listed: LoopMargins['phaseCrossoverDetails'] = [];
  const v0 = dcValue(num, den);
  if (v0 !== null && v0 < 0) listed.push({ omega: 0, gainFactor: 1 / Math.abs(v0), phaseDeg: g(0).phaseDeg });
  /** The crossover at `level` inside grid interval i, or null (a jump at an axis pole or zero). */
  const crossoverAt = (i: number, level: number): LoopMargins['phaseCrossoverDetails'][number] | null => {
    const pb = sPh[i + 1];
    const w = level === pb ? grid[i + 1] : refineLog(grid[i], grid[i + 1], (x) => phaseIn(x, i) - level);
    const v = at(w);
    const mag = cabs(v);
    // A phase jump at a pole or zero on the jω axis is not a crossover: reject it.
    if (!(mag > 0 && Number.isFinite(mag)) || Math.abs(v.im) > 1e-6 * mag || v.re >= 0) return null;
    return { omega: w, gainFactor: 1 / mag, phaseDeg: phaseIn(w, i) };
  };
  let listedBelow = Infinity;
  let stopIdx = -1;
  let attempts = 0;
  // An exact source's phase is followed only where the grid is fine enough for its inner dead
  // times (see sweepGrid); above that the crossovers are not searched.
  const lastTracked = exact ? grid.findIndex((w) => w > trackedTo) : -1;
  const scanEnd = lastTracked > 0 ? lastTracked : n - 1;
  outer: for (let i = 0; i < scanEnd; i++) {
    const pa = sPh[i];
    const pb = sPh[i + 1];
    if (!Number.isFinite(pa) || !Number.isFinite(pb)) continue;
    const lo = Math.min(pa, pb);
    const hi = Math.max(pa, pb);
    // Levels ℓ with lo < ℓ ≤ hi (a level met exactly at a grid point counts once), in ascending ω.
    const kLo = Math.floor((lo + 180) / 360) + 1;
    const kHi = Math.floor((hi + 180) / 360);
    const count = kHi - kLo + 1;
    for (let q = 0; q < count; q++) {
      ticker.tick();
      // Rejected levels (jumps at axis poles, a magnitude that underflows to 0) count too, so
      // the search ends even where no level gives a crossover.
      if (++attempts > 20 * maxListed) {
        listedBelow = grid[i];
        stopIdx = i;
        break outer;
      }
      const k = pb < pa ? kHi - q : kLo + q;
      const c = crossoverAt(i, -180 + 360 * k);
      if (!c) continue;
      if (listed.length >= maxListed) {
        listedBelow = c.omega;
        stopIdx = i;
        break outer;
      }
      listed.push(c);
    }
  }

  // ——— the unlisted tail: counted, described, and its deciding crossovers located
  let tail: PhaseCrossoverTail | null = null;
  const deciding: PhaseCrossoverTail['deciding'] = [];
  const untracked = stopIdx < 0 && scanEnd < n - 1;
  if (untracked) {
    stopIdx = scanEnd;
    listedBelow = grid[scanEnd];
  }
  if (stopIdx >= 0 || L.delay > 0 || delayScale > 0) {
    const from = stopIdx >= 0 ? listedBelow : grid[n - 1];
    const i0 = stopIdx >= 0 ? stopIdx : n - 1;
    const phFrom = stopIdx >= 0 ? phaseIn(from, i0) : sPh[n - 1];
    const phTo = sPh[n - 1];
    const levels = Math.abs(Math.floor((phTo + 180) / 360) - Math.floor((phFrom + 180) / 360));
    const count = exact ? null : Number.isFinite(levels) && levels < 2 ** 53 ? levels + (stopIdx >= 0 ? 1 : 0) : null;
    let fMin = Infinity;
    let fMax = 0;
    for (let i = i0; i < n; i++) {
      const m = sMag[i];
      if (m > 0 && Number.isFinite(m)) {
        fMin = Math.min(fMin, 1 / m);
        fMax = Math.max(fMax, 1 / m);
      }
    }
    const limit = atInfinity > 0 ? 1 / atInfinity : Infinity;
    const infinite = L.delay > 0 || delayScale > 0;
    if (infinite) {
      fMin = Math.min(fMin, limit);
      fMax = Math.max(fMax, limit);
    }
    // Deciding crossovers: next to the local extremes of |L| in the tail that could beat the
    // listed ones (a maximum of |L| ≤ 1 above the best listed for the gain margin, a minimum of
    // |L| ≥ 1 below the best listed for the lower one) and next to |L| = 1; the eight closest
    // to |L| = 1 are located.
    let bestBelow = 0;
    let bestAbove = Infinity;
    for (const p of listed) {
      const m = 1 / p.gainFactor;
      if (m <= 1) bestBelow = Math.max(bestBelow, m);
      else bestAbove = Math.min(bestAbove, m);
    }
    const candidates: { i: number; closeness: number }[] = [];
    for (let i = Math.max(i0, 1); i + 1 < (exact ? scanEnd : n); i++) {
      const a = sMag[i - 1];
      const b = sMag[i];
      const c = sMag[i + 1];
      const crossing = side(a) !== side(b);
      const useful = (b >= a && b >= c && b <= 1 && b > bestBelow) || (b <= a && b <= c && b >= 1 && b < bestAbove);
      if (crossing || useful) candidates.push({ i, closeness: Math.abs(Math.log(b)) });
    }
    candidates.sort((a, b) => a.closeness - b.closeness);
    const marks = candidates.slice(0, 8).map((c) => c.i);
    if (stopIdx >= 0) marks.push(stopIdx);
    for (const i of marks) {
      ticker.tick();
      for (const j of [i - 1, i]) {
        if (j < i0 || j + 1 >= n) continue;
        const pa = sPh[j];
        const pb = sPh[j + 1];
        if (!Number.isFinite(pa) || !Number.isFinite(pb)) continue;
        // The levels nearest either end of the interval (the crossovers next to the mark).
        const lo = Math.min(pa, pb);
        const hi = Math.max(pa, pb);
        const kLo = Math.floor((lo + 180) / 360) + 1;
        const kHi = Math.floor((hi + 180) / 360);
        for (const k of new Set([kLo, kLo + 1, kHi - 1, kHi])) {
          if (k < kLo || k > kHi) continue;
          const c = crossoverAt(j, -180 + 360 * k);
          if (c && c.omega > (stopIdx >= 0 ? listedBelow * (1 - 1e-12) : grid[n - 1]) && !deciding.some((d) => d.omega === c.omega))
            deciding.push(c);
        }
      }
    }
    deciding.sort((a, b) => a.omega - b.omega);
    for (const d of deciding) {
      fMin = Math.min(fMin, d.gainFactor);
      fMax = Math.max(fMax, d.gainFactor);
    }
    if (stopIdx >= 0 || infinite) {
      tail = {
        listedBelow: stopIdx >= 0 ? listedBelow : grid[n - 1],
        count: stopIdx >= 0 ? count : 0,
        countedTo: grid[n - 1],
        infiniteBeyond: infinite,
        spacing: L.delay > 0 ? (2 * Math.PI) / L.delay : null,
        gainFactorMin: fMin,
        gainFactorMax: fMax,
        deciding,
      };
      if (stopIdx < 0 && infinite) {
        notes.push(
          `phase crossovers: all ${listed.length} below ${fmt(grid[n - 1])} rad/s are listed; infinitely many lie above (dead time), ` +
            `with gain factors between ${fmt(fMin)} and ${fmt(fMax)}`,
        );
      }
      if (untracked) {
        notes.push(
          `phase crossovers: the ${listed.length} below ${fmt(listedBelow)} rad/s are listed; above it the exact response (dead time inside another loop) ` +
            `turns too fast to follow and is not searched` +
            (infinite ? ' (infinitely many lie there)' : '') +
            `; the magnitude there allows gain factors between ${fmt(fMin)} and ${fmt(fMax)}`,
        );
      } else if (stopIdx >= 0) {
        notes.push(
          `phase crossovers: the first ${listed.length} are listed (below ${fmt(listedBelow)} rad/s); ` +
            `${count === null ? 'too many to count' : count} more up to ${fmt(grid[n - 1])} rad/s` +
            (infinite ? ', and infinitely many above (dead time)' : '') +
            `; their gain factors lie between ${fmt(fMin)} and ${fmt(fMax)}`,
        );
      }
    }
  }

  // ——— gain margins from listed and deciding crossovers, and the limit at high frequency
  let upper: { omega: number; gainFactor: number } | null = null;
  let lower: { omega: number; gainFactor: number } | null = null;
  for (const p of [...listed, ...deciding]) {
    if (p.gainFactor >= 1 && (!upper || p.gainFactor < upper.gainFactor)) upper = p;
    if (p.gainFactor < 1 && (!lower || p.gainFactor > lower.gainFactor)) lower = p;
  }
  let upperAtInfinity = false;
  let lowerAtInfinity = false;
  if ((L.delay > 0 || delayScale > 0) && atInfinity > 0) {
    // The crossovers keep coming as ω → ∞ with factors tending to 1/|L(∞)|: an infimum (or
    // supremum) that is approached, not attained.
    const lim = 1 / atInfinity;
    if (lim >= 1 && (!upper || lim < upper.gainFactor)) {
      upper = { omega: NaN, gainFactor: lim };
      upperAtInfinity = true;
    }
    if (lim < 1 && (!lower || lim > lower.gainFactor)) {
      lower = { omega: NaN, gainFactor: lim };
      lowerAtInfinity = true;
    }
  }
  if (upperAtInfinity)
    notes.push(
      `gain margin ${fmt(upper!.gainFactor)} is approached as ω → ∞ (|L| → ${fmt(atInfinity)}), not reached at a finite frequency`,
    );
  if (lowerAtInfinity) notes.push(`lower gain margin ${fmt(lower!.gainFactor)} is approached as ω → ∞, not reached at a finite frequency`);
  let worst: (typeof gainCrossoverDetails)[number] | null = null;
  for (const c of gainCrossoverDetails) if (!worst || c.phaseMarginDeg < worst.phaseMarginDeg) worst = c;

  // ——— peaks of S and T, bandwidth
  // |L| that overflows (1e300 gains over ω²) gives S = 0 and T = 1, its limits; a value that
  // could not be formed at all (NaN) is left out of the peaks.
  const compOf = (re: number, im: number, mag: number) => {
    const h = modulus(1 + re, im);
    return Number.isFinite(h) ? mag / h : h === Infinity ? 1 : NaN;
  };
  const sVals = new Float64Array(n);
  const tVals = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    sVals[i] = 1 / modulus(1 + sRe[i], sIm[i]);
    tVals[i] = compOf(sRe[i], sIm[i], sMag[i]);
  }
  const sAt = (w: number) => {
    const v = at(w);
    return 1 / modulus(1 + v.re, v.im);
  };
  const tAt = (w: number) => {
    const v = at(w);
    return compOf(v.re, v.im, modulus(v.re, v.im));
  };
  // With dead time |1 + L| dips next to every phase crossover (the closest approach to −1 is
  // there), so the listed and deciding crossovers are candidate peaks as well as the grid's.
  const extra = [...listed, ...deciding].map((c) => c.omega).filter((w) => w > 0);
  const s = peakOf(grid, sVals, sAt, extra);
  const t = peakOf(grid, tVals, tAt, extra);
  const neutral = (L.delay > 0 || delayScale > 0) && atInfinity >= 1 - 1e-12;
  if (neutral) {
    // |L| → |L(∞)| ≥ 1 with the phase turning without end: |1 + L| comes arbitrarily close to
    // 0 (or |L| − 1) infinitely often, so the suprema are not reached at a finite frequency.
    if (atInfinity <= 1 + 1e-12) {
      s.value = Infinity;
      t.value = Infinity;
      s.omega = Infinity;
      t.omega = Infinity;
      notes.push('Ms and Mt grow without bound as ω → ∞ (|L| → 1 with dead time)');
    }
  }
  const smallGain = L.delay > 0 && !exact && g.integrators <= 0 && g.poles.every((p) => p.re < 0) && belowOneForAllOmega(num, den);

  // Padé order: the smallest whose phase stays within 1° of the dead time up to twice the highest
  // crossover (padeOrderFor), at least 3; an explicit opts.padeOrder wins.
  const wRef = 2 * Math.max(1e-300, ...gainCrossoverDetails.map((c) => c.omega), upper && Number.isFinite(upper.omega) ? upper.omega : 0);
  const hint = L.delay > 0 ? Math.max(3, padeOrderFor(L.delay, Number.isFinite(wRef) ? wRef : 1 / L.delay)) : 1;
  const stability = verdict(hint, smallGain);
  if (stability.closedLoopStable) {
    for (const c of gainCrossoverDetails) c.delayMargin = lag360(c.phaseMarginDeg) / DEG / c.omega;
  }
  const delayMargin = gainCrossoverDetails.length ? Math.min(...gainCrossoverDetails.map((c) => c.delayMargin)) : null;
  const omegaOf = (p: { omega: number } | null) => (p && Number.isFinite(p.omega) ? p.omega : null);
  // Past an unsearched crossover |S| and |T| peak where the sweep cannot see.
  if (beyondSweep) s.value = t.value = s.omega = t.omega = NaN;
  else if (Number.isNaN(s.value) || Number.isNaN(t.value))
    notes.push('L(jω) could not be formed in floating point at some frequencies (overflow): Ms or Mt not available');
  const bandwidth = bandwidthOf(grid, tVals, tAt, num, den);
  return {
    ...empty,
    ...stability,
    gainMargin: upper ? upper.gainFactor : null,
    gainMarginDb: upper ? 20 * Math.log10(upper.gainFactor) : null,
    phaseCrossover: omegaOf(upper),
    lowerGainMargin: lower ? lower.gainFactor : null,
    lowerGainMarginDb: lower ? 20 * Math.log10(lower.gainFactor) : null,
    lowerPhaseCrossover: omegaOf(lower),
    phaseMarginDeg: worst ? worst.phaseMarginDeg : null,
    gainCrossover: worst ? worst.omega : null,
    delayMargin,
    peakSensitivity: Number.isNaN(s.value) ? null : s.value,
    peakSensitivityFrequency: Number.isNaN(s.value) || Number.isNaN(s.omega) ? null : s.omega,
    peakComplementary: Number.isNaN(t.value) ? null : t.value,
    peakComplementaryFrequency: Number.isNaN(t.value) || Number.isNaN(t.omega) ? null : t.omega,
    bandwidth: bandwidth === null || Number.isNaN(bandwidth) ? null : bandwidth,
    gainCrossovers: gainCrossoverDetails.map((c) => c.omega),
    phaseCrossovers: listed.map((c) => c.omega),
    gainCrossoverDetails,
    phaseCrossoverDetails: listed,
    phaseCrossoverTail: tail,
  };
}

const fmt = (x: number): string => (Number.isFinite(x) ? `${+x.toPrecision(6)}` : String(x));

/** Closed-loop poles: roots of D·Dp + N·Np, where Np/Dp is the (n, n) Padé approximant of the dead time. */
export function closedLoopPolesOf(
  num: readonly number[],
  den: readonly number[],
  delay: number,
  order?: number,
): { poles: Complex[]; padeOrder: number | null } {
  const r = closedLoopPolesDetailed(num, den, delay, order);
  return { poles: r.poles, padeOrder: r.padeOrder };
}

/**
 * |N(jω)| < |D(jω)| at every ω > 0, and N(0) ≠ −D(0): exactly, as the polynomial
 * E(x) = |D(jω)|² − |N(jω)|² in x = ω² having no root in x > 0 while positive there. (Judged on
 * the sweep instead, a loop like e^(−1e308·s)/(s + 1) would fail: its |L| rounds to 1 wherever
 * ω < 1e-8.)
 */
function belowOneForAllOmega(num: readonly number[], den: readonly number[]): boolean {
  const sq = (p: readonly number[]) => {
    // |p(jω)|² = E(ω²) with the even and odd parts: p(jω) = Pe(−ω²) + jω·Po(−ω²).
    const even: number[] = [];
    const odd: number[] = [];
    p.forEach((c, i) => (i % 2 ? odd : even).push(i % 4 < 2 ? c : -c));
    // (j^i = 1, j, −1, −j): Re = Σ even terms with alternating sign, Im = ω·Σ odd terms likewise.
    return P.add(P.mul(even, even), P.mul([0, 1], P.mul(odd, odd)));
  };
  const E = P.sub(sq(den), sq(num));
  if (P.isZero(E)) return false;
  if ((num[0] ?? 0) === -(den[0] ?? 0) && (den[0] ?? 0) !== 0) return false; // L(0) = −1
  if (P.evalReal(E, 1) <= 0) return false;
  try {
    return !polyRootsDetailed(E, { maxDegree: 2 * MAX_ORDER }).roots.some((x) => x.im === 0 && x.re > 0);
  } catch {
    return false;
  }
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
 * A sign change of f between a and b, refined in log ω by Brent's method (inverse quadratic
 * interpolation and secant steps, falling back to bisection whenever they would not shrink the
 * bracket fast enough: never much worse than bisection, superlinear on smooth f; Brent 1973,
 * ch. 4, in the form of Press et al., Numerical Recipes, 2nd ed., §9.3 (from memory)); stops when
 * the bracket is 4e-16 of ln ω wide (full double precision).
 */
function refineLog(a: number, b: number, f: (w: number) => number): number {
  let xa = Math.log(a);
  let xb = Math.log(b);
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  let xc = xb;
  let fc = fb;
  let d = xb - xa;
  let e = d;
  for (let it = 0; it < 100; it++) {
    if (fb > 0 === fc > 0) {
      // the root lies between xb and xa: xc takes xa's place
      xc = xa;
      fc = fa;
      d = e = xb - xa;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      // xb is the best estimate so far
      xa = xb;
      xb = xc;
      xc = xa;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2e-16 * Math.max(1, Math.abs(xb));
    const m = 0.5 * (xc - xb);
    if (Math.abs(m) <= tol) break;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (xa === xc) {
        p = 2 * m * s; // secant
        q = 1 - s;
      } else {
        const r0 = fa / fc; // inverse quadratic interpolation
        const r1 = fb / fc;
        p = s * (2 * m * r0 * (r0 - r1) - (xb - xa) * (r1 - 1));
        q = (r0 - 1) * (r1 - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = e = m; // bisection
      }
    } else {
      d = e = m;
    }
    xa = xb;
    fa = fb;
    xb += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(Math.exp(xb));
    if (fb === 0 || !Number.isFinite(fb)) return Math.exp(xb);
  }
  return Math.exp(xb);
}

/**
 * Maximum of f over the grid, each of the three largest local maxima refined by Brent's search in
 * log ω; `extra` frequencies (phase crossovers) are candidates too, refined within ±0.1 % of ω.
 */
function peakOf(
  grid: readonly number[],
  vals: ArrayLike<number>,
  f: (w: number) => number,
  extra: readonly number[] = [],
): { value: number; omega: number } {
  const cands: number[] = [];
  // NaN samples (values that could not be formed) are no candidates and no neighbours.
  const at = (i: number) => (i >= 0 && i < vals.length && !Number.isNaN(vals[i]) ? vals[i] : -Infinity);
  for (let i = 0; i < vals.length; i++) {
    if (Number.isNaN(vals[i])) continue;
    if (vals[i] >= at(i - 1) && vals[i] >= at(i + 1)) cands.push(i);
  }
  cands.sort((a, b) => vals[b] - vals[a]);
  let best = { value: vals[cands[0]] ?? NaN, omega: grid[cands[0]] ?? NaN };
  for (const i of cands.slice(0, 3)) {
    if (!Number.isFinite(vals[i])) return { value: Infinity, omega: grid[i] };
    const a = Math.log(grid[Math.max(0, i - 1)]);
    const b = Math.log(grid[Math.min(grid.length - 1, i + 1)]);
    const r = brentMax(a, b, (x) => f(Math.exp(x)));
    if (r.value > best.value) best = { value: r.value, omega: Math.exp(r.x) };
    if (vals[i] > best.value) best = { value: vals[i], omega: grid[i] };
  }
  for (const w of extra) {
    const v = f(w);
    if (!Number.isFinite(v)) return { value: Infinity, omega: w };
    if (!(v > best.value * (1 - 1e-3))) continue;
    const r = brentMax(Math.log(w) - 1e-3, Math.log(w) + 1e-3, (x) => f(Math.exp(x)));
    if (r.value > best.value) best = { value: r.value, omega: Math.exp(r.x) };
    if (v > best.value) best = { value: v, omega: w };
  }
  return best;
}

/**
 * The largest value of f on [a, b] near its local maximum, by Brent's method (parabolic
 * interpolation through the three best points, golden-section steps whenever the parabola is not
 * trusted; Brent 1973, ch. 5, in the form of Numerical Recipes, 2nd ed., §10.2 (from memory)). x is
 * located to about 1e-9 of max(1, |x|): a smooth maximum is flat to round-off well before that.
 */
function brentMax(a: number, b: number, f: (x: number) => number): { x: number; value: number } {
  const CGOLD = 0.381966011250105;
  let x = a + CGOLD * (b - a);
  let w = x;
  let v = x;
  let fx = -f(x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  for (let it = 0; it < 100; it++) {
    const xm = 0.5 * (a + b);
    const tol1 = 1e-9 * Math.max(1, Math.abs(x));
    const tol2 = 2 * tol1;
    if (Math.abs(x - xm) <= tol2 - 0.5 * (b - a)) break;
    let golden = true;
    if (Math.abs(e) > tol1) {
      const r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      q = Math.abs(q);
      const last = e;
      e = d;
      if (Math.abs(p) < Math.abs(0.5 * q * last) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q; // the parabola's vertex
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = xm >= x ? tol1 : -tol1;
        golden = false;
      }
    }
    if (golden) {
      e = x >= xm ? a - x : b - x;
      d = CGOLD * e;
    }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d >= 0 ? tol1 : -tol1);
    const fu = -f(u);
    if (fu <= fx) {
      if (u >= x) a = x;
      else b = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  return { x, value: -fx };
}

function bandwidthOf(
  grid: readonly number[],
  tVals: ArrayLike<number>,
  tAt: (w: number) => number,
  num: readonly number[],
  den: readonly number[],
): number | null {
  const v0 = dcValue(num, den);
  // Integrators in L make T(0) = 1; otherwise T(0) = L(0)/(1 + L(0)).
  const t0 = v0 === null ? ((num[0] ?? 0) === 0 && den[0] === 0 ? NaN : 1) : Math.abs(v0 / (1 + v0));
  if (!Number.isFinite(t0) || t0 === 0) return null;
  const level = t0 / Math.SQRT2;
  for (let i = 0; i < grid.length; i++) {
    if (tVals[i] < level) return i === 0 ? null : refineLog(grid[i - 1], grid[i], (x) => tAt(x) - level);
  }
  return null;
}

/**
 * The bracketing sweep: log-spaced (pointsPerDecade), with extra points around every lightly
 * damped pole/zero pair (so a narrow resonance cannot hide two crossovers inside one step), and
 * with dead time a linear spacing cap of π/(8T) up to ωT = 20 so the phase moves < 22.5° per
 * step (T: the sum of the loop's dead times, which bounds how fast the phase turns). The upper
 * end is widened (up to 8 decades) while |L| > 0.1, except for a biproper loop, whose |L| never
 * falls: there the features end two decades above the highest pole or zero.
 */
function sweepGrid(
  L: TransferFunction,
  g: FrequencyEvaluator,
  opts: MarginOptions,
  T: number,
  atInfinity: number,
  innerDelay: number,
): { grid: number[]; trackedTo: number } {
  let [lo, hi] = frequencyRange(L, 2);
  if (T > 0 && T !== L.delay) hi = Math.max(hi, 100 / T);
  if (opts.omegaMin !== undefined) lo = opts.omegaMin;
  else {
    for (let i = 0; i < 8 && g.integrators > 0 && g(lo).mag < 10; i++) lo /= 10;
  }
  if (opts.omegaMax !== undefined) hi = opts.omegaMax;
  else if (atInfinity === 0) {
    for (let i = 0; i < 8 && g(hi).mag > 0.1; i++) hi *= 10;
  }
  if (!(lo > 0 && hi > lo && Number.isFinite(hi))) {
    throw new InputError(`frequency sweep limits must satisfy 0 < omegaMin < omegaMax, got ${lo} and ${hi}`);
  }
  const perDecade = opts.pointsPerDecade ?? 200;
  if (!(perDecade >= 2 && perDecade <= 10000))
    throw new InputError(`pointsPerDecade must lie in 2..10000, got ${perDecade}`, { field: 'pointsPerDecade' });
  const ratio = 10 ** (1 / perDecade);
  const linCap = T > 0 ? Math.PI / 8 / T : Infinity; // (π/(8T) would overflow 8T for T near 1e308)
  // Beyond ωT = 20 the cap is dropped: there the phase falls monotonically (the delay dominates
  // the bounded rational part), and every level between a step's end phases is still found.
  const linLimit = T > 0 ? 20 / T : 0;
  // Far (more than two decades) from every pole, zero and 1/T the rational part is a plain power
  // of ω and the phase is linear in ω (dead time) or constant: 20 points per decade do there.
  const feats = [...g.poles, ...g.zeros].map(cabs).filter((x) => x > 0);
  if (T > 0) feats.push(1 / T);
  if (L.delay > 0) feats.push(1 / L.delay);
  const logFeats = feats.map(Math.log10).sort((a, b) => a - b);
  const nearFeature = (w: number) => {
    const lw = Math.log10(w);
    for (const f of logFeats) if (Math.abs(lw - f) <= 2) return true;
    return logFeats.length === 0;
  };
  const sparse = 10 ** (1 / 20);
  // Dead time inside another loop turns the exact phase away from the approximant's by up to
  // ω·T_inner: steps of π/(4·T_inner) keep that below 45° per step, up to where 20000 such steps
  // reach (the phase is followed that far; see marginsOf).
  const innerCap = innerDelay > 0 ? Math.PI / 4 / innerDelay : Infinity;
  const trackedTo = innerDelay > 0 ? Math.min(hi, Math.max(lo * 10, 20000 * innerCap)) : hi;
  const pts: number[] = [];
  const from = opts.gridFrom;
  if (from && from.length > 1 && from[0] <= lo && from[from.length - 1] >= hi) {
    pts.push(lo);
    for (let i = firstIndexAtLeast(from, lo); i < from.length && from[i] < hi; i++) if (from[i] > lo) pts.push(from[i]);
  } else {
    for (let w = lo; w < hi;) {
      pts.push(w);
      const r = nearFeature(w) ? ratio : Math.max(ratio, sparse);
      let step = w < linLimit ? Math.min(w * (r - 1), linCap) : w * (r - 1);
      if (w < trackedTo) step = Math.min(step, innerCap);
      w += step;
      if (pts.length > 200000) throw new InputError('frequency sweep: more than 200000 points (the range or the dead time is too extreme)');
    }
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
  return { grid: pts, trackedTo };
}

/** First index of an ascending array whose value is ≥ x (binary search); the length when none is. */
export function firstIndexAtLeast(xs: Float64Array | readonly number[], x: number): number {
  let a = 0;
  let b = xs.length;
  while (a < b) {
    const m = (a + b) >> 1;
    if (xs[m] < x) a = m + 1;
    else b = m;
  }
  return a;
}

/** The scalar figures of a LoopMargins as plain, serialisable data (CLI JSON, worker messages, tables). */
export type MarginFigures = Omit<
  LoopMargins,
  | 'closedLoopPoles'
  | 'padeOrder'
  | 'gainCrossoverDetails'
  | 'phaseCrossoverDetails'
  | 'phaseCrossoverTail'
  | 'closedLoopAccuracy'
  | 'frequencyMethod'
  | 'notes'
>;

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
