import { InputError, assertFinite } from './errors.ts';

export interface MetricsOptions {
  /** Settling band as a fraction of the step size |y∞ − y(0)| (default 0.02, i.e. ±2 %). */
  band?: number;
  /** The commanded value; when given, the error e = reference − y is used for steadyStateError, IAE and ISE. */
  reference?: number;
  /** The final value y∞ if known (e.g. from the static gain); otherwise the last sample is used. */
  finalValue?: number;
  /** The value before the step (default y(0), the first sample); matters for a direct feedthrough that jumps at t = 0. */
  initialValue?: number;
  /** Rise-time levels as fractions of the change (default [0.1, 0.9]; [0, 1] gives 0–100 %). */
  riseLevels?: [number, number];
  /**
   * Times where the signal or its slope may jump (events, source edges). The peak is refined by
   * the parabola through three samples only when none of these lies strictly between the outer
   * two, so a refinement never spans a discontinuity.
   */
  breaks?: readonly number[];
  /**
   * Exact points of the signal between the samples (a simulator's located turning points). When
   * given (even empty) the peak is the extreme over the samples and these points, and no
   * parabola is used.
   */
  extrema?: readonly { time: number; value: number }[];
  /**
   * The trace ends before the response was complete (a run stopped on divergence, a budget or a
   * cancel): the cause. Figures measured against the final value are then refused, unless
   * `finalValue` is given; settling is always refused.
   */
  incomplete?: string;
}

/** A figure that can be refused, with the reason in `ResponseMetrics.refused`. */
export type RefusableFigure = 'riseTime' | 'overshootPct' | 'peakTime' | 'peak' | 'settlingTime' | 'steadyStateError' | 'undershootPct';

/**
 * Below this fraction of the largest excursion from the initial value, the change y∞ − y(0)
 * counts as zero: figures relative to it would divide by round-off (common practice, no source).
 */
export const NEAR_ZERO_CHANGE = 1e-3;

/**
 * Response figures of a sampled trace (null where a figure does not exist for this trace).
 * Levels are measured from the initial value y(0) towards y∞, so the figures also hold for a
 * step that starts from a non-zero operating point or goes downwards.
 */
export interface ResponseMetrics {
  /** Time from the low to the high rise level (default 10 % → 90 % of the change), linearly interpolated. */
  riseTime: number | null;
  /** 100·(peak − y∞)/(y∞ − y(0)), 0 when the response never passes y∞. */
  overshootPct: number | null;
  /**
   * Time and value of the extreme in the direction of the change (of the largest excursion from
   * y(0) when the change is near zero): from the samples and `extrema`, or refined by a parabola
   * through three samples where no break lies between them.
   */
  peakTime: number | null;
  peak: number | null;
  /** Last time |y − y∞| > band·|y∞ − y(0)|, interpolated; t(0) if never outside; null if still outside at the end. */
  settlingTime: number | null;
  /** y∞ used for the figures. */
  steadyState: number;
  /** reference − y∞, or null without a reference. */
  steadyStateError: number | null;
  /** 100·(largest excursion opposite to the change before the low rise level is reached)/|change| (non-minimum-phase dip). */
  undershootPct: number | null;
  /** ∫|e| dt and ∫e² dt by the trapezoid rule (IAE splits at sign changes), e = (reference ?? y∞) − y. */
  iae: number;
  ise: number;
  /** Why a figure is null when it is refused rather than absent (a near-zero change, an incomplete run). */
  refused: Partial<Record<RefusableFigure, string>>;
}

/** Linear interpolation of the time at which the segment (t0,y0)–(t1,y1) reaches `level`. */
const cross = (t0: number, y0: number, t1: number, y1: number, level: number) =>
  y1 === y0 ? t1 : t0 + ((level - y0) / (y1 - y0)) * (t1 - t0);

/**
 * Rise time, overshoot, peak, settling time (band configurable), steady state and error,
 * undershoot, IAE and ISE of a sampled response y(t). Definitions as in Ogata, Sec. 5-3 and
 * Nise, Sec. 4.6 (from memory), generalised to start from y(0).
 */
export function responseMetrics(t: readonly number[], y: readonly number[], opts: MetricsOptions = {}): ResponseMetrics {
  if (t.length !== y.length) throw new InputError(`time and value lists differ in length (${t.length} and ${y.length})`);
  if (t.length < 2) throw new InputError('a trace needs at least two samples');
  assertFinite(t, 'times');
  assertFinite(y, 'trace values');
  for (let i = 1; i < t.length; i++) {
    if (!(t[i] > t[i - 1])) throw new InputError(`times must increase: sample ${i} (${t[i]}) is not after ${t[i - 1]}`);
  }
  const band = opts.band ?? 0.02;
  if (!(band > 0 && band < 1)) throw new InputError(`settling band must be between 0 and 1, got ${band}`, { field: 'band' });
  const [lo, hi] = opts.riseLevels ?? [0.1, 0.9];
  if (!(lo >= 0 && hi <= 1 && lo < hi)) throw new InputError(`rise levels must satisfy 0 ≤ low < high ≤ 1, got ${lo}, ${hi}`);
  if (opts.reference !== undefined) assertFinite([opts.reference], 'reference');
  if (opts.finalValue !== undefined) assertFinite([opts.finalValue], 'final value');

  const n = t.length;
  const yInf = opts.finalValue ?? y[n - 1];
  if (opts.initialValue !== undefined) assertFinite([opts.initialValue], 'initial value');
  const y0 = opts.initialValue ?? y[0];
  const extra = opts.extrema ?? [];
  for (const p of extra) assertFinite([p.time, p.value], 'extreme point');
  const target = opts.reference ?? yInf;
  const { iae, ise } = errorIntegrals(t, y, target);
  const refused: Partial<Record<RefusableFigure, string>> = {};
  const refuse = (why: string, figures: RefusableFigure[]) => {
    for (const f of figures) refused[f] ??= why;
  };

  // the largest excursion from y(0), over samples and exact points
  let excursion = 0;
  for (let i = 0; i < n; i++) excursion = Math.max(excursion, Math.abs(y[i] - y0));
  for (const p of extra) excursion = Math.max(excursion, Math.abs(p.value - y0));
  let change = yInf - y0;
  const relative: RefusableFigure[] = ['riseTime', 'overshootPct', 'settlingTime', 'steadyStateError', 'undershootPct'];
  if (excursion === 0) refuse('the trace never leaves its initial value', [...relative, 'peak', 'peakTime']);
  else if (Math.abs(change) <= NEAR_ZERO_CHANGE * excursion) {
    refuse(
      `the final value is within ${NEAR_ZERO_CHANGE * 100} % of the largest excursion of the initial value ` +
        `(change ${fmtSmall(change)} against ${fmtSmall(excursion)}): figures relative to the change would divide by almost zero`,
      relative,
    );
    change = 0;
  }
  if (opts.incomplete !== undefined) {
    if (opts.finalValue === undefined)
      refuse(`the run stopped early (${opts.incomplete}): there is no final value to measure against`, relative);
    refuse(`the run stopped early (${opts.incomplete}): whether the response stays settled is unknown`, ['settlingTime']);
  }
  const dir = Math.sign(change);
  const steadyStateError = opts.reference === undefined || refused.steadyStateError ? null : opts.reference - yInf;

  // Peak: the extreme in the direction of the change (of the excursion when there is no change)
  const score = (v: number) => (dir !== 0 ? dir * (v - y0) : Math.abs(v - y0));
  let ip = 0;
  for (let i = 1; i < n; i++) if (score(y[i]) > score(y[ip])) ip = i;
  let peakTime: number | null = t[ip];
  let peak: number | null = y[ip];
  for (const p of extra) {
    if (score(p.value) > score(peak)) {
      peak = p.value;
      peakTime = p.time;
    }
  }
  if (opts.extrema === undefined && ip > 0 && ip < n - 1 && !breakBetween(opts.breaks, t[ip - 1], t[ip + 1])) {
    const [ta, tb, tc] = [t[ip - 1], t[ip], t[ip + 1]];
    const [ya, yb, yc] = [y[ip - 1], y[ip], y[ip + 1]];
    // Vertex of the interpolating parabola (divided differences, works on uneven steps).
    const d1 = (yb - ya) / (tb - ta);
    const d2 = (yc - yb) / (tc - tb);
    const a2 = (d2 - d1) / (tc - ta);
    const side = dir !== 0 ? dir : Math.sign(yb - y0);
    if (a2 * side < 0) {
      // p(t) = ya + d1 (t − ta) + a2 (t − ta)(t − tb); p'(t) = 0 at the vertex.
      const vertex = (ta + tb) / 2 - d1 / (2 * a2);
      if (vertex > ta && vertex < tc) {
        peakTime = vertex;
        peak = ya + d1 * (vertex - ta) + a2 * (vertex - ta) * (vertex - tb);
      }
    }
  }
  if (refused.peak) {
    peak = null;
    peakTime = null;
  }
  if (dir === 0) {
    return {
      riseTime: null,
      overshootPct: null,
      peakTime,
      peak,
      settlingTime: null,
      steadyState: yInf,
      steadyStateError,
      undershootPct: null,
      iae,
      ise,
      refused,
    };
  }
  // Progress towards y∞ as a fraction of the change: u = (y − y0)/change (0 at start, 1 at y∞).
  const u = (i: number) => (y[i] - y0) / change;
  const firstReach = (level: number): number | null => {
    if (u(0) >= level) return t[0];
    for (let i = 1; i < n; i++) if (u(i) >= level) return cross(t[i - 1], u(i - 1), t[i], u(i), level);
    return null;
  };
  const tLo = firstReach(lo);
  const tHi = firstReach(hi);
  const riseTime = tLo !== null && tHi !== null && !refused.riseTime ? tHi - tLo : null;
  const overshootPct = refused.overshootPct ? null : Math.max(0, (100 * (peak! - yInf)) / change);

  // Settling: the last sample outside the band, then the crossing into it.
  const b = band * Math.abs(change);
  let last = -1;
  for (let i = n - 1; i >= 0; i--) {
    if (Math.abs(y[i] - yInf) > b) {
      last = i;
      break;
    }
  }
  let settlingTime: number | null;
  if (refused.settlingTime) settlingTime = null;
  else if (last < 0) settlingTime = t[0];
  else if (last === n - 1) settlingTime = null;
  else {
    const level = y[last] > yInf ? yInf + b : yInf - b;
    settlingTime = cross(t[last], y[last], t[last + 1], y[last + 1], level);
  }

  // Undershoot: the deepest opposite excursion before the low rise level is first reached.
  let deepest = 0; // progress u is 0 at the initial value
  for (let i = 0; i < n; i++) {
    if (tLo !== null && t[i] > tLo) break;
    deepest = Math.min(deepest, u(i));
  }
  const undershootPct = refused.undershootPct ? null : Math.max(0, -100 * deepest);

  return { riseTime, overshootPct, peakTime, peak, settlingTime, steadyState: yInf, steadyStateError, undershootPct, iae, ise, refused };
}

/** True when a break lies strictly between a and b. */
function breakBetween(breaks: readonly number[] | undefined, a: number, b: number): boolean {
  return breaks !== undefined && breaks.some((x) => x > a && x < b);
}

const fmtSmall = (v: number) => (v === 0 ? '0' : Math.abs(v) >= 1e-3 && Math.abs(v) < 1e6 ? String(+v.toPrecision(3)) : v.toExponential(2));

/** ∫|e| and ∫e² by trapezoids; a segment whose error changes sign is split at its zero (exact for |e| of a linear segment). */
function errorIntegrals(t: readonly number[], y: readonly number[], target: number): { iae: number; ise: number } {
  let iae = 0;
  let ise = 0;
  for (let i = 1; i < t.length; i++) {
    const h = t[i] - t[i - 1];
    const e0 = target - y[i - 1];
    const e1 = target - y[i];
    ise += (h * (e0 * e0 + e1 * e1)) / 2;
    if (e0 * e1 < 0) {
      const f = Math.abs(e0) / (Math.abs(e0) + Math.abs(e1));
      iae += (h * (f * Math.abs(e0) + (1 - f) * Math.abs(e1))) / 2;
    } else iae += (h * (Math.abs(e0) + Math.abs(e1))) / 2;
  }
  return { iae, ise };
}

/** Percent overshoot of ωn²/(s² + 2ζωn s + ωn²): 100·exp(−ζπ/√(1 − ζ²)) for 0 ≤ ζ < 1, else 0. */
export function overshootFromDamping(zeta: number): number {
  if (!Number.isFinite(zeta) || zeta < 0) throw new InputError(`damping ratio must be a finite number ≥ 0, got ${zeta}`, { field: 'zeta' });
  if (zeta >= 1) return 0;
  return 100 * Math.exp((-zeta * Math.PI) / Math.sqrt(1 - zeta * zeta));
}

/** Inverse: ζ = −ln(OS/100)/√(π² + ln²(OS/100)) for 0 < OS < 100 (%). */
export function dampingFromOvershoot(overshootPct: number): number {
  if (!(overshootPct > 0 && overshootPct < 100)) {
    throw new InputError(`overshoot must be between 0 and 100 %, got ${overshootPct}`, { field: 'overshoot' });
  }
  const l = Math.log(overshootPct / 100);
  return -l / Math.sqrt(Math.PI * Math.PI + l * l);
}

/**
 * Textbook figures of the underdamped standard second-order system (0 < ζ < 1): rise time
 * 0–100 % (π − acos ζ)/ωd, peak time π/ωd, overshoot, and the settling estimates 4/(ζωn) (2 %)
 * and 3/(ζωn) (5 %). Ogata, Sec. 5-3 (from memory).
 */
export function secondOrderFigures(zeta: number, wn: number) {
  if (!(zeta > 0 && zeta < 1)) throw new InputError(`damping ratio must be between 0 and 1 (underdamped), got ${zeta}`, { field: 'zeta' });
  if (!(wn > 0 && Number.isFinite(wn)))
    throw new InputError(`natural frequency must be a positive finite number, got ${wn}`, { field: 'wn' });
  const wd = wn * Math.sqrt(1 - zeta * zeta);
  const sigma = zeta * wn;
  return {
    dampedFrequency: wd,
    riseTime0to100: (Math.PI - Math.acos(zeta)) / wd,
    peakTime: Math.PI / wd,
    overshootPct: overshootFromDamping(zeta),
    settlingEstimate2: 4 / sigma,
    settlingEstimate5: 3 / sigma,
  };
}
