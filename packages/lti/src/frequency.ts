import { type Complex, cabs } from './complex.ts';
import { InputError, assertFinite } from './errors.ts';
import * as P from './poly.ts';
import { polyRoots } from './roots.ts';
import type { TransferFunction } from './transfer.ts';

/**
 * Frequency response G(jω) with a continuous (unwrapped) phase.
 *
 * The phase is not unwrapped from grid samples (which fails when the grid is coarse next to
 * a lightly damped pole or a long dead time). Instead each factor contributes its own
 * continuous angle: G(s) = c·s^q·Π(1 − s/zᵢ)/Π(1 − s/pⱼ)·e^(−sT), and arg(1 − jω/r) never
 * leaves (−180°, 180°) as ω runs over (0, ∞) (a straight line from 1 that misses the origin),
 * so the sum is continuous in ω whatever the grid. The low-frequency anchor follows from c and
 * q: e.g. 1/s starts at −90°, −1/(s+1) at −180°. The dead time adds exactly −ωT. Finally the
 * value is snapped to the principal argument of the directly evaluated G(jω) (Horner), so the
 * root-finding error never leaks into the phase beyond the choice of 360° branch.
 */
export interface FrequencyResponse {
  omega: number[];
  re: number[];
  im: number[];
  magDb: number[];
  phaseDeg: number[];
}

/** One evaluation of G(jω): value, magnitude and unwrapped phase (degrees). */
export interface FrequencyPoint {
  re: number;
  im: number;
  mag: number;
  phaseDeg: number;
}

const DEG = 180 / Math.PI;

/** A reusable evaluator of G(jω) (roots found once); used by margins and the views. */
export interface FrequencyEvaluator {
  (omega: number): FrequencyPoint;
  /** Nonzero poles and zeros (for grids) and the number of integrators q_p − q_z. */
  readonly poles: readonly Complex[];
  readonly zeros: readonly Complex[];
  readonly integrators: number;
  /**
   * The same continuous phase (degrees) by a polynomial arctangent, within 1.2e-5 rad of each
   * factor's angle (so within 7e-4° per pole or zero) and not snapped to the value's argument:
   * a guide that picks a 360° branch for another evaluation of the same loop, never a figure.
   */
  readonly phaseGuide: (omega: number) => number;
}

/**
 * atan2(y, x) within 1.2e-5 rad: the octant reduced to a ratio t in [0, 1] and arctan t by the
 * polynomial of Abramowitz & Stegun 4.4.49 (from memory; 1.15e-5 at worst with these coefficients,
 * measured in the tests). Several times faster
 * than Math.atan2, which it falls back to where the ratio is not a number (both parts infinite).
 */
export function roughAtan2(y: number, x: number): number {
  const ax = Math.abs(x);
  const ay = Math.abs(y);
  const t = ax >= ay ? ay / ax : ax / ay;
  if (!(t >= 0 && t <= 1)) return Math.atan2(y, x);
  const t2 = t * t;
  let r = t * (0.999866 + t2 * (-0.3302995 + t2 * (0.180141 + t2 * (-0.085133 + t2 * 0.0208351))));
  if (ay > ax) r = Math.PI / 2 - r;
  if (x < 0) r = Math.PI - r;
  return y < 0 || (y === 0 && 1 / y < 0) ? -r : r; // −0 as Math.atan2 takes it
}

export function frequencyEvaluator(tf: TransferFunction): FrequencyEvaluator {
  const num = P.trim(tf.rational.num);
  const den = P.trim(tf.rational.den);
  const T = tf.delay;
  if (num.length === 0) {
    const zero = ((_w: number) => ({ re: 0, im: 0, mag: 0, phaseDeg: 0 })) as FrequencyEvaluator;
    return Object.assign(zero, { poles: [], zeros: [], integrators: 0, phaseGuide: () => 0 });
  }
  const qz = leadingZeros(num);
  const qp = leadingZeros(den);
  const c = num[qz] / den[qp];
  const logC = Math.log(Math.abs(num[qz])) - Math.log(Math.abs(den[qp]));
  const zeros = num.length - 1 > qz ? polyRoots(num.slice(qz)) : [];
  const poles = den.length - 1 > qp ? polyRoots(den.slice(qp)) : [];
  const anchor = (c < 0 ? -180 : 0) + 90 * (qz - qp);
  // Each factor as 1 − jω/r = (1 − ω·b/|r|²) + j(−ω·a/|r|²) for r = a + jb; a root exactly on
  // the imaginary axis is taken as the limit from the left half-plane (phase −180° past a
  // lightly damped pole pair, as for any LHP pair).
  const factors = (roots: readonly Complex[]) =>
    roots.map((r) => {
      // 1/r scaled by its larger part: |r|² underflows for a root below 1e-154 (a real one gave 0/0).
      const sc = Math.max(Math.abs(r.re), Math.abs(r.im));
      const a = r.re / sc;
      const b = r.im / sc;
      const m2 = a * a + b * b;
      return { br: b / m2 / sc, ar: r.re === 0 ? -0 : a / m2 / sc };
    });
  const fz = factors(zeros);
  const fp = factors(poles);
  // N(jω), D(jω) from even/odd parts (Horner in ω², no allocation): p(jω) = E(−ω²) + jω·O(−ω²).
  const split = (p: readonly number[]) => {
    const even: number[] = [];
    const odd: number[] = [];
    for (let i = 0; i < p.length; i++) (i % 2 ? odd : even).push(p[i]);
    return { even, odd };
  };
  const ns = split(num);
  const ds = split(den);
  const horner = (c: readonly number[], x: number) => {
    let v = 0;
    for (let i = c.length - 1; i >= 0; i--) v = v * x + c[i];
    return v;
  };
  const nfz = fz.length;
  const nfp = fp.length;
  const evalAt = (w: number): FrequencyPoint => {
    const x = -w * w;
    const nre = horner(ns.even, x);
    const nim = w * horner(ns.odd, x);
    const dre = horner(ds.even, x);
    const dim = w * horner(ds.odd, x);
    let phase = anchor;
    for (let i = 0; i < nfz; i++) phase += Math.atan2(-w * fz[i].ar || 0, 1 - w * fz[i].br) * DEG;
    for (let i = 0; i < nfp; i++) phase -= Math.atan2(-w * fp[i].ar || 0, 1 - w * fp[i].br) * DEG;
    // Value N/D·e^(−jωT), the division by Smith's method (no intermediate overflow for 1e308 gains).
    let re: number;
    let im: number;
    if (Math.abs(dre) >= Math.abs(dim)) {
      const r = dim / dre;
      const d = dre + dim * r;
      re = (nre + nim * r) / d;
      im = (nim - nre * r) / d;
    } else {
      const r = dre / dim;
      const d = dre * r + dim;
      re = (nre * r + nim) / d;
      im = (nim * r - nre) / d;
    }
    if (T > 0) {
      const cs = Math.cos(w * T);
      const sn = Math.sin(w * T);
      const r2 = re * cs + im * sn;
      im = im * cs - re * sn;
      re = r2;
      phase -= w * T * DEG;
    }
    // (Only with a finite phase: where ω·T itself overflows, e^(−jωT) has no value to give.)
    if ((!Number.isFinite(re) || !Number.isFinite(im)) && Number.isFinite(phase)) {
      // N(jω) and D(jω) overflowed (1e300 gains, high powers of ω): the value from the factors,
      // |G| as a sum of logarithms and the continuous phase above. |G| itself may be ±∞ or 0.
      // |1 − jω/r| = |jω − r|/|r|, each by hypot (no product overflows).
      let lm = logC + (qz - qp) * Math.log(w);
      for (const z of zeros) lm += Math.log(Math.hypot(z.re, w - z.im)) - Math.log(cabs(z));
      for (const p of poles) lm -= Math.log(Math.hypot(p.re, w - p.im)) - Math.log(cabs(p));
      const m = Math.exp(lm);
      const cs = Math.cos(phase / DEG);
      const sn = Math.sin(phase / DEG);
      return { re: cs === 0 ? 0 : m * cs, im: sn === 0 ? 0 : m * sn, mag: m, phaseDeg: phase };
    }
    const mag = Math.hypot(re, im);
    if (mag > 0 && Number.isFinite(mag)) {
      const principal = Math.atan2(im, re) * DEG;
      phase = principal + 360 * Math.round((phase - principal) / 360);
    }
    return { re, im, mag, phaseDeg: phase };
  };
  // atan2(-w*ar || 0, …) (here and in evalAt): for ar = −0 the product is +0 for w > 0, giving +180° past the pole.
  const phaseGuide = (w: number): number => {
    let rad = 0;
    for (let i = 0; i < nfz; i++) rad += roughAtan2(-w * fz[i].ar || 0, 1 - w * fz[i].br);
    for (let i = 0; i < nfp; i++) rad -= roughAtan2(-w * fp[i].ar || 0, 1 - w * fp[i].br);
    return anchor + rad * DEG - (T > 0 ? w * T * DEG : 0);
  };
  return Object.assign(evalAt, { poles, zeros, integrators: qp - qz, phaseGuide });
}

function leadingZeros(p: readonly number[]): number {
  let q = 0;
  while (q < p.length - 1 && p[q] === 0) q++;
  return q;
}

/** G(jω) on the given frequencies (rad/s, > 0 or 0), phase unwrapped continuously from low frequency. */
export function frequencyResponse(tf: TransferFunction, omegas: readonly number[]): FrequencyResponse {
  assertFinite(omegas, 'frequencies');
  for (let i = 0; i < omegas.length; i++) {
    if (omegas[i] < 0) throw new InputError(`frequencies: element ${i} is ${omegas[i]} rad/s, below 0`, { field: 'frequencies' });
  }
  const g = frequencyEvaluator(tf);
  const out: FrequencyResponse = { omega: [], re: [], im: [], magDb: [], phaseDeg: [] };
  for (const w of omegas) {
    const v = g(w);
    out.omega.push(w);
    out.re.push(v.re);
    out.im.push(v.im);
    out.magDb.push(20 * Math.log10(v.mag));
    out.phaseDeg.push(v.phaseDeg);
  }
  return out;
}

/**
 * Continuous phases (degrees) for values given only by re/im, guided by a continuous phase that
 * agrees at the first frequency and turns alike between neighbours (an approximant of the same
 * loop): each principal value is put on the branch nearest to the previous phase plus the
 * guide's change. Used where L(jω) is solved numerically (a diagram with dead times in inner
 * loops) and only its Padé approximant has a phase of its own.
 */
export function unwrapAlong<T extends number[] | Float64Array = number[]>(
  re: ArrayLike<number>,
  im: ArrayLike<number>,
  guideDeg: ArrayLike<number>,
  out: T = [] as number[] as T,
): T {
  for (let i = 0; i < re.length; i++) {
    const principal = (Math.atan2(im[i], re[i]) * 180) / Math.PI;
    const ref = i === 0 ? guideDeg[0] : out[i - 1] + (guideDeg[i] - guideDeg[i - 1]);
    out[i] = Number.isFinite(ref) ? principal + 360 * Math.round((ref - principal) / 360) : principal;
  }
  return out;
}

/** n points from 10^a to 10^b, evenly spaced in log10 (both ends included). */
export function logspace(a: number, b: number, n: number): number[] {
  if (!Number.isFinite(a) || !Number.isFinite(b)) throw new InputError(`logspace: decades must be finite, got ${a} and ${b}`);
  if (!Number.isInteger(n) || n < 1) throw new InputError(`logspace: number of points must be a whole number ≥ 1, got ${n}`);
  if (n === 1) return [10 ** a];
  const out = new Array<number>(n);
  for (let i = 0; i < n; i++) out[i] = 10 ** (a + ((b - a) * i) / (n - 1));
  return out;
}

/** The characteristic frequencies of G: |nonzero poles and zeros| and 1/T (rad/s). */
export function characteristicFrequencies(tf: TransferFunction): number[] {
  const g = frequencyEvaluator(tf);
  const out: number[] = [];
  for (const r of [...g.poles, ...g.zeros]) {
    const m = cabs(r);
    if (m > 0 && Number.isFinite(m)) out.push(m);
  }
  if (tf.delay > 0) out.push(1 / tf.delay);
  return out;
}

/**
 * A log grid from two decades below the lowest characteristic frequency (poles, zeros, 1/T)
 * to two decades above the highest, `perDecade` points per decade (default 100; at most
 * 4000 points). A loop with none (a pure gain or integrators only) gets 0.01…100 rad/s.
 */
export function defaultFrequencyGrid(tf: TransferFunction, perDecade = 100): number[] {
  const [lo, hi] = frequencyRange(tf);
  const decades = Math.log10(hi) - Math.log10(lo);
  const n = Math.min(4000, Math.max(2, Math.ceil(decades * perDecade) + 1));
  return logspace(Math.log10(lo), Math.log10(hi), n);
}

/** [low, high] of the default grid (rad/s). */
export function frequencyRange(tf: TransferFunction, marginDecades = 2): [number, number] {
  const f = characteristicFrequencies(tf);
  if (f.length === 0) return [10 ** -marginDecades, 10 ** marginDecades];
  const lo = Math.min(...f);
  const hi = Math.max(...f);
  // (the 1e−9 keeps a numerically computed pole at 10.000000001 from adding a decade)
  return [10 ** (Math.floor(Math.log10(lo) + 1e-9) - marginDecades), 10 ** (Math.ceil(Math.log10(hi) - 1e-9) + marginDecades)];
}
