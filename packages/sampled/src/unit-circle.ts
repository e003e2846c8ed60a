import {
  type Complex,
  type FrequencyPoint,
  type FrequencyResponse,
  InputError,
  assertFinite,
  cabs,
  poly as P,
  polyRoots,
} from '@loopwright/lti';
import type { DiscreteTransferFunction } from './discrete.ts';

const DEG = 180 / Math.PI;

/**
 * H(e^(jωT)) with a continuous phase, for 0 ≤ ω (usually up to the Nyquist frequency π/T).
 *
 * As for continuous loops the phase is built from continuous per-factor angles rather than
 * unwrapped from samples: for a root r inside (or on) the unit circle, arg(e^(jθ) − r) =
 * θ + arg(1 − r·e^(−jθ)) with the second term in (−90°, 90°); for r outside, arg(−r) +
 * arg(1 − e^(jθ)/r), again with a term in (−90°, 90°). Both are continuous in θ = ωT (a root on
 * the circle is taken as the limit from inside: −180° across it, as a lightly damped pole).
 * The sum is shifted by a multiple of 360° so that the low-frequency phase matches the
 * continuous convention (−90° per integrator at z = 1, −180° for a negative static gain), and
 * snapped to the principal argument of the directly evaluated H.
 */
export interface UnitCircleEvaluator {
  (omega: number): FrequencyPoint;
  readonly poles: readonly Complex[];
  readonly zeros: readonly Complex[];
  /** Net poles at z = 1 (integrators). */
  readonly integrators: number;
  readonly sampleTime: number;
  /** π/T (rad/s). */
  readonly nyquist: number;
}

/** Tolerance for a root at z = 1 (an integrator) and for a root on the unit circle. */
const ON_CIRCLE = 1e-9;
/** A computed root at z = 1 within rounding: an integrator (its coefficients rarely sum to exactly 0). */
const atOne = (r: Complex) => Math.abs(r.re - 1) <= ON_CIRCLE && Math.abs(r.im) <= ON_CIRCLE;

export function unitCircleEvaluator(h: DiscreteTransferFunction): UnitCircleEvaluator {
  const T = h.sampleTime;
  const num = P.trim(h.rational.num);
  const den = P.trim(h.rational.den);
  const extra = { sampleTime: T, nyquist: Math.PI / T };
  if (num.length === 0) {
    const zero = (() => ({ re: 0, im: 0, mag: 0, phaseDeg: 0 })) as unknown as UnitCircleEvaluator;
    return Object.assign(zero, { poles: [], zeros: [], integrators: 0, ...extra });
  }
  const zeros = num.length > 1 ? polyRoots(num) : [];
  const poles = den.length > 1 ? polyRoots(den) : [];
  const c = num[num.length - 1] / den[den.length - 1];
  const fz = zeros.map(factorAngle);
  const fp = poles.map(factorAngle);
  const zOne = zeros.map(atOne);
  const pOne = poles.map(atOne);
  const sumAt = (theta: number, lowLimit: boolean) => {
    const cs = Math.cos(theta);
    const sn = Math.sin(theta);
    let s = c < 0 ? Math.PI : 0;
    for (let i = 0; i < fz.length; i++) s += lowLimit && zOne[i] ? Math.PI / 2 : fz[i](theta, cs, sn);
    for (let i = 0; i < fp.length; i++) s -= lowLimit && pOne[i] ? Math.PI / 2 : fp[i](theta, cs, sn);
    return s;
  };
  const q = poles.filter(atOne).length - zeros.filter(atOne).length;
  // Sign of the static gain of the factors away from z = 1: c·Π(1 − zᵢ)/Π(1 − pⱼ).
  const anchor = (dcSign(c, zeros, poles, atOne) < 0 ? -180 : 0) - 90 * q;
  const offset = 360 * Math.round((anchor - sumAt(0, true) * DEG) / 360);

  const eval_ = (omega: number): FrequencyPoint => {
    const th = omega * T;
    const z = { re: Math.cos(th), im: Math.sin(th) };
    const nv = P.evalComplex(num, z);
    const dv = P.evalComplex(den, z);
    const dd = dv.re * dv.re + dv.im * dv.im;
    const re = (nv.re * dv.re + nv.im * dv.im) / dd;
    const im = (nv.im * dv.re - nv.re * dv.im) / dd;
    const mag = Math.hypot(re, im);
    let phase = sumAt(th, false) * DEG + offset;
    if (mag > 0 && Number.isFinite(mag)) {
      const principal = Math.atan2(im, re) * DEG;
      phase = principal + 360 * Math.round((phase - principal) / 360);
    }
    return { re, im, mag, phaseDeg: phase };
  };
  return Object.assign(eval_, { poles, zeros, integrators: q, ...extra });
}

/** The continuous angle of the factor (e^(jθ) − r) as a function of θ (radians), given cos θ and sin θ. */
function factorAngle(r: Complex): (th: number, cs: number, sn: number) => number {
  const m = cabs(r);
  if (m <= 1 + ON_CIRCLE) {
    // On the circle: use the unit-modulus root so that Re(1 − r·e^(−jθ)) ≥ 0.
    const rr = Math.abs(m - 1) <= ON_CIRCLE ? { re: r.re / m, im: r.im / m } : r;
    const a = rr.re;
    const b = rr.im;
    return (th, cs, sn) => th + Math.atan2(a * sn - b * cs, 1 - (a * cs + b * sn));
  }
  const base = Math.atan2(-r.im, -r.re);
  const qre = r.re / (m * m);
  const qim = -r.im / (m * m);
  return (_th, cs, sn) => base + Math.atan2(-(sn * qre + cs * qim), 1 - (cs * qre - sn * qim));
}

function dcSign(c: number, zeros: readonly Complex[], poles: readonly Complex[], atOne: (r: Complex) => boolean): number {
  // Conjugate pairs give |1 − r|² > 0; only real roots can change the sign.
  let s = Math.sign(c);
  for (const r of zeros) if (!atOne(r) && r.im === 0) s *= Math.sign(1 - r.re) || 1;
  for (const r of poles) if (!atOne(r) && r.im === 0) s *= Math.sign(1 - r.re) || 1;
  return s;
}

/** H(e^(jωT)) on the given frequencies (rad/s, ≥ 0), phase continuous. */
export function sampledFrequencyResponse(h: DiscreteTransferFunction, omegas: readonly number[]): FrequencyResponse {
  assertFinite(omegas, 'frequencies');
  const g = unitCircleEvaluator(h);
  const out: FrequencyResponse = { omega: [], re: [], im: [], magDb: [], phaseDeg: [] };
  omegas.forEach((w, i) => {
    if (w < 0) throw new InputError(`frequencies: element ${i} is ${w} rad/s, below 0`, { field: 'frequencies' });
    const v = g(w);
    out.omega.push(w);
    out.re.push(v.re);
    out.im.push(v.im);
    out.magDb.push(20 * Math.log10(v.mag));
    out.phaseDeg.push(v.phaseDeg);
  });
  return out;
}

/**
 * The frequency grid of a sampled loop, up to the Nyquist frequency π/T (included): log-spaced
 * from two decades below the slowest pole or zero (taken at its equivalent s-plane size
 * |ln z|/T) — lower while integrators keep |H| below 10 — plus a linear spacing of at most π/512
 * in ωT, plus points clustered around every root near the unit circle (lightly damped in z).
 */
export function sampledFrequencyGrid(g: UnitCircleEvaluator, pointsPerDecade = 200): number[] {
  const T = g.sampleTime;
  const wN = g.nyquist;
  const sizes: number[] = [];
  for (const r of [...g.poles, ...g.zeros]) {
    const m = cabs(r);
    if (m === 0 || atOne(r)) continue;
    const s = Math.hypot(Math.log(m), Math.atan2(r.im, r.re)) / T;
    if (s > 0 && Number.isFinite(s)) sizes.push(s);
  }
  let lo = sizes.length ? 10 ** (Math.floor(Math.log10(Math.min(...sizes)) + 1e-9) - 2) : wN * 1e-4;
  lo = Math.min(lo, wN * 1e-3);
  for (let i = 0; i < 8 && g.integrators > 0 && g(lo).mag < 10; i++) lo /= 10;
  const pts: number[] = [];
  const ratio = 10 ** (1 / pointsPerDecade);
  for (let w = lo; w < wN; w *= ratio) pts.push(w);
  const steps = 512;
  for (let i = 1; i < steps; i++) pts.push((wN * i) / steps);
  pts.push(wN);
  for (const r of [...g.poles, ...g.zeros]) {
    const m = cabs(r);
    const dist = Math.abs(1 - m);
    if (m === 0 || dist > 0.2 || r.im === 0) continue;
    const th = Math.abs(Math.atan2(r.im, r.re));
    const width = Math.max(dist, 1e-9);
    for (const k of [-8, -4, -2, -1, -0.5, 0, 0.5, 1, 2, 4, 8]) {
      const w = (th + k * width) / T;
      if (w > lo && w < wN) pts.push(w);
    }
  }
  pts.sort((a, b) => a - b);
  return pts.filter((w, i) => i === 0 || w > pts[i - 1]);
}
