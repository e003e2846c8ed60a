import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { cabs, cx, poly, polyRoots } from '@loopwright/lti';
import { juryTest, unitCircleRootCount } from './jury.ts';

const fromRoots = (rs: { re: number; im: number }[]) =>
  poly.fromRoots(rs.flatMap((r) => (r.im === 0 ? [cx(r.re)] : [cx(r.re, r.im), cx(r.re, -r.im)])));

/** Roots as real values or conjugate pairs, away from the unit circle by at least 1e-3 so the verdict is well posed. */
const rootSet = fc.array(
  fc.oneof(
    fc.double({ min: -1.6, max: 1.6, noNaN: true }).map((re) => ({ re, im: 0 })),
    fc.record({ re: fc.double({ min: -1.2, max: 1.2, noNaN: true }), im: fc.double({ min: 0.01, max: 1.2, noNaN: true }) }),
  ),
  { minLength: 1, maxLength: 5 },
);

describe('Jury test and unit-circle root count against the roots themselves', () => {
  it('Jury says stable exactly when every root lies inside the unit circle (fast-check)', () => {
    fc.assert(
      fc.property(rootSet, fc.double({ min: 0.2, max: 5, noNaN: true }), fc.boolean(), (rs, k, flip) => {
        if (rs.some((r) => Math.abs(Math.hypot(r.re, r.im) - 1) < 1e-3)) return;
        const p = poly.scale(fromRoots(rs), flip ? -k : k);
        const inside = rs.every((r) => Math.hypot(r.re, r.im) < 1);
        expect(juryTest(p).stable).toBe(inside);
      }),
    );
  });
  it('the bilinear map + Routh–Hurwitz counts roots inside, on and outside (fast-check)', () => {
    fc.assert(
      fc.property(rootSet, (rs) => {
        if (rs.some((r) => Math.abs(Math.hypot(r.re, r.im) - 1) < 1e-3 || Math.hypot(r.re + 1, r.im) < 1e-3)) return;
        const p = fromRoots(rs);
        const roots = polyRoots(p);
        const c = unitCircleRootCount(p);
        expect(c.inside).toBe(roots.filter((z) => cabs(z) < 1).length);
        expect(c.outside).toBe(roots.filter((z) => cabs(z) > 1).length);
        expect(c.on).toBe(0);
      }),
    );
  });
  it('roots on the circle: z = ±1 and e^(±jπ/3) are counted on it, and Jury is not satisfied', () => {
    const p = poly.fromRoots([cx(1), cx(-1), cx(0.5, Math.sqrt(3) / 2), cx(0.5, -Math.sqrt(3) / 2), cx(0.3)]);
    const c = unitCircleRootCount(p);
    expect(c).toEqual({ inside: 1, on: 4, outside: 0 });
    expect(juryTest(p).stable).toBe(false);
  });
  it('third order: the conditions are |a3| < 1, P(1) > 0, −P(−1) > 0, |1 − a3²| > |a2 − a1·a3| (textbook form, Ogata Sec. 4-3 (from memory))', () => {
    // z³ − 1.2z² + 0.47z − 0.06 = (z − 0.3)(z − 0.4)(z − 0.5)
    const p = poly.fromDescending([1, -1.2, 0.47, -0.06]);
    const j = juryTest(p);
    expect(j.conditions).toHaveLength(4);
    expect(j.stable).toBe(true);
    const [a1, a2, a3] = [-1.2, 0.47, -0.06];
    expect(Math.abs(j.conditions[3].left - Math.abs(a3 * a3 - 1))).toBeLessThanOrEqual(1e-15);
    expect(Math.abs(j.conditions[3].right - Math.abs(a3 * a1 - a2))).toBeLessThanOrEqual(1e-15);
  });
  it('bad input', () => {
    expect(() => juryTest([])).toThrow(/zero polynomial/);
    expect(() => juryTest([1, NaN])).toThrow(/finite/);
  });
});
