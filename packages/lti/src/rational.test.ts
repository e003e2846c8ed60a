import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as P from './poly.ts';
import {
  S,
  isProper,
  rational,
  radd,
  rcompose,
  rconst,
  rstaticGain,
  rderivative,
  rdiv,
  revalComplex,
  revalReal,
  rformat,
  rinv,
  rmul,
  rpow,
  rsub,
  rvalueAtInfinity,
  relativeDegree,
} from './rational.ts';
import { cabs, csub, cx } from './complex.ts';
import { InputError } from './errors.ts';
import { tevalComplex, transfer } from './transfer.ts';

const coeffs = fc.array(fc.integer({ min: -9, max: 9 }), { minLength: 1, maxLength: 4 });
const nonZeroDen = coeffs.filter((c) => c.some((x) => x !== 0));
const ratArb = fc.tuple(coeffs, nonZeroDen).map(([n, d]) => rational(n, d));
// Evaluation points away from the real axis avoid poles of integer-coefficient denominators.
const z = cx(0.37, 1.29);

describe('rational functions', () => {
  it('follow field identities at a test point (property, checked by evaluation)', () => {
    fc.assert(
      fc.property(ratArb, ratArb, (a, b) => {
        const va = revalComplex(a, z);
        const vb = revalComplex(b, z);
        const sum = revalComplex(radd(a, b), z);
        expect(cabs(csub(sum, cx(va.re + vb.re, va.im + vb.im)))).toBeLessThan(1e-9 * (1 + cabs(sum)));
        const prod = revalComplex(rmul(a, b), z);
        const want = cx(va.re * vb.re - va.im * vb.im, va.re * vb.im + va.im * vb.re);
        expect(cabs(csub(prod, want))).toBeLessThan(1e-9 * (1 + cabs(want)));
        if (!P.isZero(b.num)) {
          const back = revalComplex(rmul(rdiv(a, b), b), z);
          expect(cabs(csub(back, va))).toBeLessThan(1e-9 * (1 + cabs(va)));
        }
        expect(P.lead(radd(a, b).den)).toBe(1); // normalised: monic denominator
        return true;
      }),
      { numRuns: 1000 },
    );
  });

  it('differentiates by the quotient rule (checked against a central difference)', () => {
    const g = rational([2, 1], [6, 5, 1]); // (s + 2)/(s² + 5s + 6)
    const d = rderivative(g);
    for (const x of [0.3, 1.7, 4]) {
      const h = 1e-5;
      const fd = (revalReal(g, x + h) - revalReal(g, x - h)) / (2 * h);
      expect(revalReal(d, x)).toBeCloseTo(fd, 8);
    }
  });

  it('composes: frequency scaling s → s/ω0 of 1/(s + 1) gives ω0/(s + ω0)', () => {
    const w0 = 5;
    const r = rcompose(rational([1], [1, 1]), rational([0, 1 / w0]));
    expect(r.num).toEqual([5]);
    expect(r.den).toEqual([5, 1]);
  });

  it('gives static gain, value at infinity, relative degree and properness', () => {
    const g = rational([120 * 2, 120], [12, 7, 1]); // 120(s+2)/((s+3)(s+4)): Kp = 20, Nise Sec. 7.3 (from memory) [R38]
    expect(rstaticGain(g)).toBeCloseTo(20, 12);
    expect(rvalueAtInfinity(g)).toBe(0);
    expect(relativeDegree(g)).toBe(1);
    expect(isProper(rational([0, 0, 1], [1, 1]))).toBe(false);
    expect(rstaticGain(rational([1], [0, 1]))).toBe(Infinity);
    expect(rvalueAtInfinity(rational([1, 2], [3, 4]))).toBeCloseTo(0.5, 15);
  });

  it('raises to integer powers, inverts, and refuses zero denominators', () => {
    const g = rpow(radd(S, rconst(2)), 2);
    expect(g.num).toEqual([4, 4, 1]);
    expect(rpow(S, -2)).toEqual({ num: [1], den: [0, 0, 1] });
    expect(() => rational([1], [0])).toThrow(InputError);
    expect(() => rinv(rsub(S, S))).toThrow(/identically zero/);
    expect(() => rpow(S, 1.5)).toThrow(/integer/);
  });

  it('formats highest power first', () => {
    expect(rformat(rational([6], [6, 5, 1]))).toBe('(6)/(s^2 + 5*s + 6)');
    expect(P.format([-1, 0, 2])).toBe('2*s^2 - 1');
  });

  it('multiplies in the dead time exactly: |e^(−jωT)| = 1 and phase −ωT', () => {
    const g = transfer(rational([2], [1, 1]), 1.5);
    const v = tevalComplex(g, cx(0, 2));
    const r = revalComplex(g.rational, cx(0, 2));
    expect(cabs(v)).toBeCloseTo(cabs(r), 14);
    const dphi = Math.atan2(v.im, v.re) - Math.atan2(r.im, r.re);
    expect(Math.cos(dphi)).toBeCloseTo(Math.cos(-3), 12);
    expect(() => transfer(g.rational, -1)).toThrow(/dead time/);
  });
});
