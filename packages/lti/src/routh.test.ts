import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { cx, type Complex } from './complex.ts';
import { fromRoots } from './poly.ts';
import { polyRoots } from './roots.ts';
import { routhHurwitz } from './routh.ts';

describe('routhHurwitz', () => {
  it('counts roots at the origin as jω roots', () => {
    // s²(s + 1): two roots at 0 (factored out), one in the LHP.
    const r = routhHurwitz([0, 0, 1, 1]);
    expect([r.rhp, r.jw, r.lhp, r.rootsAtOrigin]).toEqual([0, 2, 1, 2]);
    // s³ + s² + s = s(s² + s + 1)
    expect([routhHurwitz([0, 1, 1, 1]).jw, routhHurwitz([0, 1, 1, 1]).lhp]).toEqual([1, 2]);
  });

  it('repeated jω roots: (s² + 1)² gives two rows of zeros', () => {
    const r = routhHurwitz(fromRoots([cx(0, 1), cx(0, -1), cx(0, 1), cx(0, -1)]));
    expect(r.auxiliaries.length).toBe(2);
    expect([r.rhp, r.jw, r.lhp]).toEqual([0, 4, 0]);
  });

  it('a negative leading coefficient does not change the counts', () => {
    const a = routhHurwitz([1030, 31, 10, 1]);
    const b = routhHurwitz([-1030, -31, -10, -1]);
    expect([b.rhp, b.jw, b.lhp]).toEqual([a.rhp, a.jw, a.lhp]);
  });

  it('constant and first-order polynomials', () => {
    expect([routhHurwitz([3]).rhp, routhHurwitz([3]).lhp]).toEqual([0, 0]);
    expect(routhHurwitz([-2, 1]).rhp).toBe(1);
    expect(routhHurwitz([2, 1]).lhp).toBe(1);
  });

  it('property: counts agree with polyRoots on random well-separated roots (1,000 runs)', () => {
    // Roots drawn from a grid 0.25 apart, at least 0.25 from the imaginary axis; distinct.
    const re = fc.integer({ min: 1, max: 16 }).chain((k) => fc.constantFrom(k * 0.25, -k * 0.25));
    const root = fc.record({ re, im: fc.integer({ min: 0, max: 12 }), imag: fc.boolean() });
    fc.assert(
      fc.property(fc.uniqueArray(root, { minLength: 1, maxLength: 5, selector: (r) => `${r.re},${r.imag ? r.im : 0}` }), (spec) => {
        const roots: Complex[] = [];
        for (const r of spec) {
          if (r.imag && r.im > 0) roots.push(cx(r.re, r.im * 0.5), cx(r.re, -r.im * 0.5));
          else roots.push(cx(r.re));
        }
        const p = fromRoots(roots);
        const got = routhHurwitz(p);
        const found = polyRoots(p);
        const rhp = found.filter((z) => z.re > 0).length;
        expect(got.rhp).toBe(rhp);
        expect(got.rhp).toBe(roots.filter((z) => z.re > 0).length);
        expect(got.jw).toBe(0);
        expect(got.lhp).toBe(roots.length - rhp);
      }),
      { numRuns: 1000 },
    );
  });

  it('property: integer real roots with imaginary-axis pairs ±jk, including ε-then-row-of-zeros cases (1,000 runs)', () => {
    // Exact integer coefficients, so rows of zeros appear exactly; some draws need ε first
    // (e.g. roots −3, 4, −2, 1, ±2j), where a single numeric ε would miss the later zero row.
    fc.assert(
      fc.property(
        fc.uniqueArray(
          fc.integer({ min: -4, max: 4 }).filter((k) => k !== 0),
          { maxLength: 5 },
        ),
        fc.uniqueArray(fc.integer({ min: 1, max: 3 }), { minLength: 1, maxLength: 2 }),
        (reals, ims) => {
          const roots = [...reals.map((r) => cx(r)), ...ims.flatMap((k) => [cx(0, k), cx(0, -k)])];
          const r = routhHurwitz(fromRoots(roots));
          expect([r.rhp, r.jw, r.lhp]).toEqual([reals.filter((x) => x > 0).length, 2 * ims.length, reals.filter((x) => x < 0).length]);
        },
      ),
      { numRuns: 1000 },
    );
  });

  it('ε followed by a row of zeros: (s − 1)(s − 4)(s + 2)(s + 3)(s² + 4)', () => {
    const r = routhHurwitz(fromRoots([cx(-3), cx(4), cx(-2), cx(1), cx(0, 2), cx(0, -2)]));
    expect(r.epsilonRows.length).toBeGreaterThan(0);
    expect(r.auxiliaries.length).toBeGreaterThan(0);
    expect([r.rhp, r.jw, r.lhp]).toEqual([2, 2, 2]);
  });
});
