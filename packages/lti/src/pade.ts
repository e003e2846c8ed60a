import { type Complex, cx } from './complex.ts';
import { InputError } from './errors.ts';
import { polyRoots } from './roots.ts';
import { type Rational, rational } from './rational.ts';

/** Highest Padé order offered (beyond it the coefficients span too many decades to help). */
export const MAX_PADE_ORDER = 10;

/**
 * Diagonal (n, n) Padé approximant of the dead time e^(−sT): N(sT)/D(sT) with
 * D(x) = Σ c_k x^k, N(x) = D(−x), c_k = (2n−k)! n! / ((2n)! k! (n−k)!) (the closed form for
 * the exponential's Padé table). All-pass: |P(jω)| = 1; poles in the left half-plane.
 * Ascending coefficients in s; the denominator is made monic by `rational`.
 */
export function padeDelay(T: number, order: number): Rational {
  if (!Number.isFinite(T) || T < 0) throw new InputError(`dead time must be a finite number ≥ 0 s, got ${T}`, { field: 'delay' });
  if (!Number.isInteger(order) || order < 0 || order > MAX_PADE_ORDER) {
    throw new InputError(`Padé order must be a whole number from 0 to ${MAX_PADE_ORDER}, got ${order}`, { field: 'order' });
  }
  if (T === 0 || order === 0) return rational([1], [1]);
  const c = padeCoefficients(order);
  const den = c.map((ck, k) => ck * T ** k);
  if (!den.every((x) => Number.isFinite(x) && x !== 0)) {
    throw new InputError(
      `dead time ${T} s is too long or too short for a Padé (${order},${order}) approximant in coefficients (they overflow or underflow); ` +
        'change the time unit so that dead times and time constants are of moderate size',
      { field: 'delay' },
    );
  }
  const num = den.map((dk, k) => (k % 2 ? -dk : dk));
  return rational(num, den);
}

/** c_0 … c_n of the (n, n) Padé approximant of e^(−x): c_0 = 1, c_k = c_(k−1)·(n−k+1)/(k·(2n−k+1)). */
export function padeCoefficients(n: number): number[] {
  // The ratio form of (2n−k)! n! / ((2n)! k! (n−k)!) avoids huge factorials.
  const c = [1];
  for (let k = 1; k <= n; k++) c.push((c[k - 1] * (n - k + 1)) / (k * (2 * n - k + 1)));
  return c;
}

/** Roots of D(x) = Σ c_k x^k (x = sT) per order, computed once: the approximant's poles are x_i/T. */
const unitRoots = new Map<number, Complex[]>();
export function padeUnitPoles(order: number): Complex[] {
  let r = unitRoots.get(order);
  if (!r) {
    r = order === 0 ? [] : polyRoots(padeCoefficients(order));
    unitRoots.set(order, r);
  }
  return r;
}

/**
 * Poles of the (n, n) Padé approximant of e^(−sT): x_i/T for the roots x_i of Σ c_k x^k. Its zeros
 * are their mirror images −x_i/T (all-pass), and the ratio of leading coefficients
 * numerator/denominator is (−1)^n. Formed without the coefficients c_k·T^k, which overflow for
 * long dead times (T = 1e308 s).
 */
export function padePoles(T: number, order: number): Complex[] {
  if (!Number.isFinite(T) || T <= 0) throw new InputError(`dead time must be a finite number > 0 s, got ${T}`, { field: 'delay' });
  return padeUnitPoles(order).map((x) => cx(x.re / T, x.im / T));
}

/**
 * Phase (rad, continuous, ≤ 0) of the (n, n) Padé approximant at frequency ω: the all-pass
 * N(jω)/D(jω) = conj(D)/D has phase −2·arg D(jω), and with every root p of D in the left
 * half-plane arg D(jω) = Σ atan2(ω − Im p, −Re p) is continuous in ω. Computed in x = ωT,
 * so it holds for any T.
 */
export function padePhase(T: number, order: number, omega: number): number {
  if (!(T > 0) || order === 0) return 0;
  const x = omega * T;
  let arg = 0;
  for (const p of padeUnitPoles(order)) arg += Math.atan2(x - p.im, -p.re);
  return -2 * arg;
}

/**
 * Padé order for a dead time T used up to frequency omegaMax (our choice, documented): the
 * smallest n in 1..10 whose phase error |∠P(jω) + ωT| at ω = omegaMax is at most 1°
 * (0.01745 rad); 10 when none is. T = 0 needs no approximant: 0. omegaMax ≤ 0 gives 1.
 * (An (n, n) approximant tracks the delay's phase to about ωT ≈ n, so loops whose crossover
 * lies below omegaMax see the delay faithfully.)
 */
export function padeOrderFor(T: number, omegaMax: number): number {
  if (!Number.isFinite(T) || T < 0) throw new InputError(`dead time must be a finite number ≥ 0 s, got ${T}`, { field: 'delay' });
  if (!Number.isFinite(omegaMax)) throw new InputError(`frequency must be finite, got ${omegaMax}`, { field: 'omegaMax' });
  if (T === 0) return 0;
  if (omegaMax <= 0) return 1;
  const tol = Math.PI / 180;
  for (let n = 1; n <= MAX_PADE_ORDER; n++) {
    if (Math.abs(padePhase(T, n, omegaMax) + omegaMax * T) <= tol) return n;
  }
  return MAX_PADE_ORDER;
}
