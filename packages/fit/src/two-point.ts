import { InputError } from '@loopwright/lti';

/**
 * Classical graphical estimates from a step test, used as starting points of the least-squares
 * fit and reported beside it.
 *
 * Two-point method (Smith, Digital Computer Process Control, 1972 (from memory); levels as in
 * Seborg, Edgar & Mellichamp (from memory)): t28 and t63 are the times after the step at which
 * the output has made 28.3 % and 63.2 % of its final change; τ = 1.5·(t63 − t28),
 * θ = t63 − τ, K = final change / step size. For a true FOPDT response the method is exact with
 * the levels 1 − e^(−1/3) and 1 − e^(−1), which `EXACT_TWO_POINT_LEVELS` gives.
 */
export const TWO_POINT_LEVELS: readonly [number, number] = [0.283, 0.632];
export const EXACT_TWO_POINT_LEVELS: readonly [number, number] = [1 - Math.exp(-1 / 3), 1 - Math.exp(-1)];

export interface TwoPointEstimate {
  gain: number;
  timeConstant: number;
  deadTime: number;
  /** Times after the step at which the two levels were reached (s). */
  t28: number;
  t63: number;
  levels: [number, number];
  stepTime: number;
  stepSize: number;
  finalChange: number;
}

/**
 * The first time after `from` at which y reaches `level` (y rising) or falls to it (y falling),
 * by linear interpolation between samples; null if it never does.
 */
export function crossingTime(
  time: ArrayLike<number>,
  y: ArrayLike<number>,
  level: number,
  rising: boolean,
  from = -Infinity,
): number | null {
  for (let i = 1; i < time.length; i++) {
    if (time[i] < from) continue;
    const a = y[i - 1];
    const b = y[i];
    const reached = rising ? b >= level : b <= level;
    if (!reached) continue;
    const before = rising ? a < level : a > level;
    if (!before || time[i - 1] < from) return time[i];
    return time[i - 1] + ((level - a) / (b - a)) * (time[i] - time[i - 1]);
  }
  return null;
}

/**
 * Two-point estimate from a response y (deviations) to a step of size `stepSize` at
 * `stepTime`, with the final change `finalChange` (default: the mean of the last 5 % of the
 * samples, at least 3).
 */
export function twoPointEstimate(
  time: ArrayLike<number>,
  y: ArrayLike<number>,
  step: { stepTime: number; stepSize: number; finalChange?: number; levels?: readonly [number, number] },
): TwoPointEstimate {
  const n = time.length;
  const levels = step.levels ?? TWO_POINT_LEVELS;
  if (!(levels[0] > 0 && levels[0] < levels[1] && levels[1] < 1)) {
    throw new InputError(`two-point levels must satisfy 0 < first < second < 1, got ${levels[0]} and ${levels[1]}`, { field: 'levels' });
  }
  if (!(step.stepSize !== 0 && Number.isFinite(step.stepSize)))
    throw new InputError(`step size must be a finite number other than 0, got ${step.stepSize}`, { field: 'stepSize' });
  let final = step.finalChange;
  if (final === undefined) {
    const m = Math.max(3, Math.ceil(0.05 * n));
    let s = 0;
    for (let i = n - m; i < n; i++) s += y[i];
    final = s / m;
  }
  if (!(final !== 0 && Number.isFinite(final)))
    throw new InputError('two-point method: the output has no final change to measure', { field: 'output' });
  const rising = final > 0;
  const t1 = crossingTime(time, y, levels[0] * final, rising, step.stepTime);
  const t2 = crossingTime(time, y, levels[1] * final, rising, step.stepTime);
  if (t1 === null || t2 === null)
    throw new InputError(`two-point method: the output never reaches ${100 * levels[1]} % of its final change`, { field: 'output' });
  // With general levels a < b: τ = (t_b − t_a)/(ln(1/(1−b)) − ln(1/(1−a))); the textbook 1.5 is
  // 1/(1 − 1/3) for the exact levels, kept as 1.5 for the classical 0.283/0.632.
  const classical = levels[0] === TWO_POINT_LEVELS[0] && levels[1] === TWO_POINT_LEVELS[1];
  const la = -Math.log(1 - levels[0]);
  const lb = -Math.log(1 - levels[1]);
  const tau = classical ? 1.5 * (t2 - t1) : (t2 - t1) / (lb - la);
  const dt = t2 - step.stepTime;
  const theta = classical ? dt - tau : dt - lb * tau;
  return {
    gain: final / step.stepSize,
    timeConstant: tau,
    deadTime: theta,
    t28: t1 - step.stepTime,
    t63: dt,
    levels: [levels[0], levels[1]],
    stepTime: step.stepTime,
    stepSize: step.stepSize,
    finalChange: final,
  };
}

/**
 * The straight-line asymptote of a ramp response (an integrating process after a step):
 * least-squares line y ≈ slope·t + intercept over the samples with t ≥ from. For k′e^(−θs)/s
 * driven by a step Δu at t0: slope = k′·Δu and the line meets y = 0 at t0 + θ (a lag τ behind
 * the integrator shows up as τ of extra dead time).
 */
export function rampAsymptote(
  time: ArrayLike<number>,
  y: ArrayLike<number>,
  from: number,
): { slope: number; intercept: number; zeroCrossing: number } {
  let n = 0;
  let st = 0;
  let sy = 0;
  for (let i = 0; i < time.length; i++) {
    if (time[i] < from) continue;
    n++;
    st += time[i];
    sy += y[i];
  }
  if (n < 2) throw new InputError('ramp asymptote: fewer than two samples after the given time', { field: 'time' });
  const mt = st / n;
  const my = sy / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < time.length; i++) {
    if (time[i] < from) continue;
    sxx += (time[i] - mt) ** 2;
    sxy += (time[i] - mt) * (y[i] - my);
  }
  const slope = sxy / sxx;
  const intercept = my - slope * mt;
  return { slope, intercept, zeroCrossing: -intercept / slope };
}
