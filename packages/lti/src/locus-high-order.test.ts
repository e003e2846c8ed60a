import { describe, expect, it } from 'vitest';
import { type Complex, cabs, cx } from './complex.ts';
import { BudgetError } from './errors.ts';
import { budgetNow } from './budget.ts';
import * as P from './poly.ts';
import { rootLocus } from './locus.ts';

/**
 * Order-robust locus (issue 10, item 7): high orders finish fast and stay correct, checked
 * against closed forms and against the exact open-loop roots (evaluated in product form,
 * independently of the solver's own root finding). Per-test limits are wide because the test
 * machines are shared; `npm run bench` records the real times.
 */
const LIMIT_MS = 8000;

/**
 * The Newton step |f/f′| of f = D + k (D = Π(s − p) from the exact poles, no zeros) at a traced
 * pole, relative to |s|: how far the pole is from an exact closed-loop pole, independent of
 * the solver. f/f′ = (1 + k/D)/Σ 1/(s − p), with k/D formed factor by factor (no overflow).
 */
function newtonStep(poles: readonly Complex[], s: Complex, k: number): number {
  let qr = k;
  let qi = 0;
  let sr = 0;
  let si = 0;
  for (const p of poles) {
    const dr = s.re - p.re;
    const di = s.im - p.im;
    const dd = dr * dr + di * di;
    if (dd === 0) return 0;
    const ir = dr / dd;
    const ii = -di / dd;
    const nr = qr * ir - qi * ii;
    qi = qr * ii + qi * ir;
    qr = nr;
    sr += ir;
    si += ii;
  }
  return cabs(cx(1 + qr, qi)) / cabs(cx(sr, si)) / cabs(s);
}

describe('root locus at high order', () => {
  for (const order of [20, 40, 60]) {
    it(`1/(s+1)^${order}: crossing at ω = tan(π/${order}) with k = sec(π/${order})^${order}; traced poles on |s + 1| = k^(1/${order})`, () => {
      const t0 = budgetNow();
      const L = rootLocus([1], P.pow([1, 1], order));
      expect(budgetNow() - t0).toBeLessThan(LIMIT_MS);
      // (s + 1)^n + k = 0: s = −1 + k^(1/n)·e^(j(2q+1)π/n); the branch at angle π/n meets the
      // imaginary axis where its real part is 0 (derived here).
      const c = L.crossings.find((x) => x.omega > 0)!;
      expect(c.omega).toBeCloseTo(Math.tan(Math.PI / order), 10);
      expect(c.gain / (1 / Math.cos(Math.PI / order)) ** order - 1).toBeLessThan(1e-10);
      for (let j = 1; j < L.gains.length; j += 37) {
        const k = L.gains[j];
        const r = k ** (1 / order);
        for (const br of L.branches) {
          const p = br.find((q) => q.k === k);
          if (!p) continue;
          expect(Math.abs(cabs(cx(p.s.re + 1, p.s.im)) - r)).toBeLessThan(1e-9 * (1 + r));
        }
      }
      expect(L.poles.every((p) => Math.abs(p.re + 1) < 1e-14 && p.im === 0)).toBe(true);
      expect(L.accuracy.limited).toBe(false);
    });
  }

  it('30 distinct poles (geometric spread): every traced pole solves D + kN = 0 with D from the exact poles', () => {
    const poles = Array.from({ length: 30 }, (_, i) => cx(-0.5 * 1.2 ** i));
    const t0 = budgetNow();
    const L = rootLocus([1], P.fromRoots(poles));
    expect(budgetNow() - t0).toBeLessThan(LIMIT_MS);
    // The expanded coefficients fix these poles only to ~1e-4 (relative): the result says so.
    expect(L.accuracy.openLoopRelativeError).toBeGreaterThan(1e-8);
    let worst = 0;
    // (Breakaway gains excluded: a double root has f′ = 0, where a Newton step measures nothing.)
    const special = new Set(L.breakaways.map((b) => b.gain));
    for (let j = 1; j < L.gains.length; j += 23) {
      const k = L.gains[j];
      if (special.has(k)) continue;
      for (const br of L.branches) {
        const p = br.find((q) => q.k === k);
        if (p) worst = Math.max(worst, newtonStep(poles, p.s, k));
      }
    }
    // Good to the accuracy the coefficients allow, which the result reports.
    expect(worst).toBeLessThan(Math.max(1e-9, 4 * L.accuracy.worstRelativeError));
  });

  it('thirty poles −1…−30 (Wilkinson-like): finishes, and flags that the coefficients cannot fix the poles', () => {
    const t0 = budgetNow();
    const L = rootLocus([1], P.fromRoots(Array.from({ length: 30 }, (_, i) => cx(-(i + 1)))));
    expect(budgetNow() - t0).toBeLessThan(LIMIT_MS);
    expect(L.accuracy.limited).toBe(true);
    expect(L.accuracy.note).toMatch(/accuracy limited/);
  });

  it('(s + 2)^5 / ((s + 1)^20 (s² + s + 4)^10): overlapping repeated-root clusters are found and the trace ends', () => {
    const t0 = budgetNow();
    const L = rootLocus(P.pow([2, 1], 5), P.mul(P.pow([1, 1], 20), P.pow([4, 1, 1], 10)));
    expect(budgetNow() - t0).toBeLessThan(LIMIT_MS);
    const at = (z: Complex) => L.poles.filter((p) => cabs(cx(p.re - z.re, p.im - z.im)) < 1e-5).length;
    expect(at(cx(-1))).toBe(20);
    expect(at(cx(-0.5, Math.sqrt(15) / 2))).toBe(10);
    expect(at(cx(-0.5, -Math.sqrt(15) / 2))).toBe(10);
    expect(L.branches).toHaveLength(40);
  });

  it('a deadline stops the trace with a BudgetError', () => {
    expect(() => rootLocus([1], P.pow([1, 1], 40), { deadline: budgetNow() - 1 })).toThrow(BudgetError);
  });

  it('a numerator root beyond the floating-point range (1e-320·s² + s + 3: a root near −1e320) is a clean InputError, not NaN branches', () => {
    // Found by the expression fuzzer: 1e-320(s − 1e5)/(s + 3) + 1/(s + 1). The roots of
    // 1e-320·s² + s + 3 are ≈ −3 and ≈ −1e320 (sum of roots −b/a, Vieta): the second is not a double.
    expect(() => rootLocus(P.fromDescending([1e-320, 1, 3]), P.fromDescending([1, 4, 3]))).toThrow(
      /numerator N\(s\): a root lies beyond the floating-point range/,
    );
  });
});
