import { describe, expect, it } from 'vitest';
import { InputError } from './errors.ts';
import { cabs, cexp, csub, cx } from './complex.ts';
import { MAX_PADE_ORDER, padeCoefficients, padeDelay, padeOrderFor, padePhase } from './pade.ts';
import { revalComplex } from './rational.ts';
import { polyRoots } from './roots.ts';

const fact = (n: number): number => (n <= 1 ? 1 : n * fact(n - 1));

describe('padeDelay', () => {
  it('coefficients equal the factorial closed form (2n−k)! n! / ((2n)! k! (n−k)!)', () => {
    // Closed form of the exponential's diagonal Padé approximant (Golub & Van Loan, Sec. 9.3.1, from memory).
    for (let n = 0; n <= MAX_PADE_ORDER; n++) {
      const c = padeCoefficients(n);
      for (let k = 0; k <= n; k++) {
        const want = (fact(2 * n - k) * fact(n)) / (fact(2 * n) * fact(k) * fact(n - k));
        expect(Math.abs(c[k] - want)).toBeLessThanOrEqual(1e-14 * want);
      }
    }
  });

  it('all orders are all-pass with left-half-plane poles, and converge to e^(−jωT)', () => {
    const T = 0.7;
    let prevErr = Infinity;
    for (let n = 1; n <= MAX_PADE_ORDER; n++) {
      const p = padeDelay(T, n);
      for (const w of [0.3, 2, 9]) expect(Math.abs(cabs(revalComplex(p, cx(0, w))) - 1)).toBeLessThanOrEqual(1e-12);
      for (const z of polyRoots(p.den)) expect(z.re).toBeLessThan(0);
      const err = cabs(csub(revalComplex(p, cx(0, 3)), cexp(cx(0, -3 * T))));
      if (prevErr > 1e-13) expect(err).toBeLessThan(prevErr); // monotone until the rounding floor
      prevErr = err;
    }
    expect(prevErr).toBeLessThan(1e-12);
  });

  it('T = 0 and order 0 give 1; bad arguments are InputErrors', () => {
    expect(padeDelay(0, 4)).toEqual({ num: [1], den: [1] });
    expect(padeDelay(3, 0)).toEqual({ num: [1], den: [1] });
    expect(() => padeDelay(-1, 2)).toThrow(InputError);
    expect(() => padeDelay(1, 11)).toThrow(InputError);
    expect(() => padeDelay(1, 1.5)).toThrow(InputError);
    expect(() => padeDelay(NaN, 1)).toThrow(InputError);
  });

  it('padeOrderFor: the phase error at omegaMax is within 1°, and one order lower is not', () => {
    for (const [T, w] of [
      [1, 1],
      [0.5, 4],
      [2, 3],
      [1, 0.05],
    ]) {
      const n = padeOrderFor(T, w);
      expect(Math.abs(padePhase(T, n, w) + w * T)).toBeLessThanOrEqual(Math.PI / 180);
      if (n > 1) expect(Math.abs(padePhase(T, n - 1, w) + w * T)).toBeGreaterThan(Math.PI / 180);
    }
    expect(padeOrderFor(0, 10)).toBe(0);
    expect(padeOrderFor(1, 1000)).toBe(MAX_PADE_ORDER);
  });
});
