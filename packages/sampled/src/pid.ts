import { InputError, poly as P, rational, radd, rconst } from '@loopwright/lti';
import { type DiscreteTransferFunction, checkSampleTime, discreteTransfer } from './discrete.ts';

/** How the integral is approximated: I(k) = I(k−1) + bi·e(k) (backward), + bi·e(k−1) (forward), + bi·(e(k) + e(k−1))/2 (tustin). */
export const INTEGRAL_METHODS = ['backward', 'forward', 'tustin'] as const;
export type IntegralMethod = (typeof INTEGRAL_METHODS)[number];
/** How the filtered derivative td·s/(1 + Tf·s) is discretised. */
export const DERIVATIVE_METHODS = ['backward', 'tustin'] as const;
export type DerivativeMethod = (typeof DERIVATIVE_METHODS)[number];
/** As the continuous PID block: none, back-calculation with tracking time tt, or conditional integration. */
export const PID_ANTI_WINDUP = ['off', 'back-calculation', 'conditional'] as const;
export type PidAntiWindup = (typeof PID_ANTI_WINDUP)[number];

/**
 * The PID block's settings (same names and meaning as the continuous block): ideal form
 * kp·(1 + 1/(ti·s) + td·s/(1 + td·s/n)) or parallel form kp + ki/s + kd·s/(1 + (kd/kp)·s/n);
 * output limits umin/umax (±Infinity or absent = none); anti-windup with tracking time tt.
 */
export interface PidSettings {
  form?: 'ideal' | 'parallel';
  kp: number;
  /** Ideal form: integral time (s); Infinity or absent = no integral action. */
  ti?: number;
  /** Ideal form: derivative time (s); 0 or absent = none. */
  td?: number;
  /** Parallel form: integral gain (1/s). */
  ki?: number;
  /** Parallel form: derivative gain (s). */
  kd?: number;
  /** Derivative filter: time constant td/n (default 10). */
  n?: number;
  umin?: number;
  umax?: number;
  antiWindup?: PidAntiWindup;
  /** Tracking time (s) for back-calculation; absent: √(ti·td), or ti without derivative (as the block). */
  tt?: number;
}

/**
 * Coefficients of the discrete PID in position form, sample time T (Åström & Hägglund,
 * Advanced PID Control, 2006, ch. 13; Åström & Wittenmark, Computer-Controlled Systems,
 * ch. 8 (from memory)):
 *   P(k) = kp·e(k)
 *   D(k) = ad·D(k−1) + bd·(e(k) − e(k−1))            (filtered derivative)
 *   I    per the integral method with bi = ki·T
 *   v = P + I + D,  u = min(max(v, umin), umax)
 *   back-calculation: I ← I + br·(u − v), br = T/tt.
 */
export interface PidCoefficients {
  kp: number;
  bi: number;
  ad: number;
  bd: number;
  br: number;
  umin: number;
  umax: number;
}

export interface PidDiscretisation {
  integral?: IntegralMethod;
  derivative?: DerivativeMethod;
}

/** Continuous gains of the settings: ki (1/s), kd (s) and the derivative filter time constant tf (s). */
export function pidGains(s: PidSettings): { kp: number; ki: number; kd: number; tf: number } {
  const kp = finiteField(s.kp, 'kp');
  const n = s.n ?? 10;
  if (!(n > 0) || !Number.isFinite(n))
    throw new InputError(`field n: the derivative filter n must be a finite number > 0, got ${n}`, { field: 'n' });
  let ki: number;
  let kd: number;
  if (s.form === 'parallel') {
    ki = finiteField(s.ki ?? 0, 'ki');
    kd = finiteField(s.kd ?? 0, 'kd');
  } else {
    const ti = s.ti ?? Infinity;
    if (Number.isNaN(ti) || ti <= 0)
      throw new InputError(`field ti: the integral time must be > 0 s (blank = no integral action), got ${ti}`, { field: 'ti' });
    const td = s.td ?? 0;
    if (!Number.isFinite(td) || td < 0)
      throw new InputError(`field td: the derivative time must be a finite number ≥ 0 s, got ${td}`, { field: 'td' });
    ki = Number.isFinite(ti) ? kp / ti : 0;
    kd = kp * td;
  }
  let tf = 0;
  if (kd !== 0) {
    if (kp === 0) throw new InputError('field kp: derivative action with kp = 0 has no filter time constant (kd/(kp·n))', { field: 'kp' });
    tf = kd / kp / n;
    if (!(tf > 0)) throw new InputError(`field kd: kd/kp must be positive for the derivative filter, got ${kd / kp}`, { field: 'kd' });
  }
  return { kp, ki, kd, tf };
}

/** Back-calculation tracking time when none is given: √(ti·td) with derivative, ti without (Åström & Hägglund 2006, §3.5 (from memory)). */
export function pidTrackingTime(s: PidSettings): number {
  if (s.tt !== undefined && !Number.isNaN(s.tt)) {
    if (!(s.tt > 0) || !Number.isFinite(s.tt))
      throw new InputError(`field tt: the tracking time must be a finite number > 0 s, got ${s.tt}`, { field: 'tt' });
    return s.tt;
  }
  const g = pidGains(s);
  const ti = g.ki !== 0 ? g.kp / g.ki : NaN;
  const td = g.kp !== 0 ? g.kd / g.kp : 0;
  if (!(ti > 0) || !Number.isFinite(ti)) return 1;
  return td > 0 ? Math.sqrt(ti * td) : ti;
}

/** The discrete PID's coefficients for sample time T. */
export function pidCoefficients(s: PidSettings, sampleTime: number, how: PidDiscretisation = {}): PidCoefficients {
  const T = checkSampleTime(sampleTime);
  const { kp, ki, kd, tf } = pidGains(s);
  const { umin, umax } = outputLimits(s.umin, s.umax);
  let ad = 0;
  let bd = 0;
  if (kd !== 0) {
    if ((how.derivative ?? 'backward') === 'tustin') {
      ad = (2 * tf - T) / (2 * tf + T);
      bd = (2 * kd) / (2 * tf + T);
    } else {
      ad = tf / (tf + T);
      bd = kd / (tf + T);
    }
  }
  const limited = Number.isFinite(umin) || Number.isFinite(umax);
  let br = 0;
  if (limited && ki !== 0 && (s.antiWindup ?? 'back-calculation') === 'back-calculation') {
    br = T / pidTrackingTime(s);
    // The tracking recursion I ← I + br·(u − v) shrinks the excess u − v by (1 − br) per sample.
    if (br >= 2) {
      throw new InputError(
        `field tt: a tracking time of ${T / br} s is at or below half the sample time ${T} s, where discrete back-calculation is unstable (T/tt must be below 2)`,
        {
          field: 'tt',
        },
      );
    }
  }
  return { kp, bi: ki * T, ad, bd, br, umin, umax };
}

/** Checks and orders output limits; absent = ±Infinity. */
export function outputLimits(lo: number | undefined, hi: number | undefined): { umin: number; umax: number } {
  const umin = lo ?? -Infinity;
  const umax = hi ?? Infinity;
  if (Number.isNaN(umin) || umin === Infinity)
    throw new InputError(`field umin: the lower output limit must be a number or blank, got ${umin}`, { field: 'umin' });
  if (Number.isNaN(umax) || umax === -Infinity)
    throw new InputError(`field umax: the upper output limit must be a number or blank, got ${umax}`, { field: 'umax' });
  if (!(umin < umax))
    throw new InputError(`field umax: the upper output limit ${umax} must be above the lower one ${umin}`, { field: 'umax' });
  return { umin, umax };
}

/**
 * The linear part of the discrete PID as a pulse transfer function (limits ignored):
 * C(z) = kp + I(z) + bd·(z − 1)/(z − ad), I(z) = bi·z/(z − 1) (backward), bi/(z − 1) (forward),
 * (bi/2)·(z + 1)/(z − 1) (tustin).
 */
export function pidTransfer(c: PidCoefficients, sampleTime: number, integral: IntegralMethod = 'backward'): DiscreteTransferFunction {
  let r = rconst(c.kp);
  if (c.bi !== 0) {
    const inum = integral === 'backward' ? [0, c.bi] : integral === 'forward' ? [c.bi] : [c.bi / 2, c.bi / 2];
    r = radd(r, rational(inum, [-1, 1]));
  }
  if (c.bd !== 0) r = radd(r, rational([-c.bd, c.bd], [-c.ad, 1]));
  const h = discreteTransfer(r.num, r.den, sampleTime, 'discrete PID');
  return P.isZero(h.rational.num) ? discreteTransfer([], [1], sampleTime) : h;
}

function finiteField(v: number, name: string): number {
  if (typeof v !== 'number' || !Number.isFinite(v))
    throw new InputError(`field ${name}: must be a finite number, got ${v}`, { field: name });
  return v;
}
