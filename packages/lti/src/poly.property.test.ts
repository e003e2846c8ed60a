import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { type Complex, cabs, compareComplex, csub, cx } from './complex.ts';
import * as P from './poly.ts';
import { polyRoots } from './roots.ts';

// Algebraic identities of the polynomial ring (any algebra text), checked by evaluation at
// sample points so that rounding in the coefficients is judged relative to their size.
const coef = fc.integer({ min: -20, max: 20 }).map((k) => k / 4);
const polyArb = fc.array(coef, { maxLength: 7 });
const xs = [-1.3, -0.4, 0.7, 1.9];
const size = (p: P.Poly, x: number) => p.reduce((s, c, i) => s + Math.abs(c) * Math.abs(x) ** i, 0);
function sameValues(a: P.Poly, b: P.Poly, scale = 1) {
  for (const x of xs) {
    const tol = 1e-9 * (1 + size(a, x) + size(b, x)) * scale;
    expect(Math.abs(P.evalReal(a, x) - P.evalReal(b, x))).toBeLessThanOrEqual(tol);
  }
}

describe('polynomial identities (fast-check, 1,000 runs each)', () => {
  it('addition and multiplication are commutative (coefficients identical)', () => {
    fc.assert(
      fc.property(polyArb, polyArb, (a, b) => {
        expect(P.add(a, b)).toEqual(P.add(b, a));
        expect(P.mul(a, b)).toEqual(P.mul(b, a));
      }),
      { numRuns: 1000 },
    );
  });

  it('multiplication distributes over addition: a(b + c) = ab + ac', () => {
    fc.assert(
      fc.property(polyArb, polyArb, polyArb, (a, b, c) => {
        sameValues(P.mul(a, P.add(b, c)), P.add(P.mul(a, b), P.mul(a, c)));
      }),
      { numRuns: 1000 },
    );
  });

  it('division: a = q·b + r with deg r < deg b', () => {
    fc.assert(
      fc.property(
        polyArb,
        polyArb.filter((b) => !P.isZero(b)),
        (a, b) => {
          const { q, r } = P.divmod(a, b);
          expect(P.degree(r)).toBeLessThan(P.degree(b));
          sameValues(a, P.add(P.mul(q, b), r));
        },
      ),
      { numRuns: 1000 },
    );
  });

  it("derivative product rule: (ab)' = a'b + ab'", () => {
    fc.assert(
      fc.property(polyArb, polyArb, (a, b) => {
        sameValues(P.derivative(P.mul(a, b)), P.add(P.mul(P.derivative(a), b), P.mul(a, P.derivative(b))));
      }),
      { numRuns: 1000 },
    );
  });

  it('composition with s + 0 is the identity; with s + h it is a shift p(x + h)', () => {
    fc.assert(
      fc.property(polyArb, coef, (a, h) => {
        expect(P.compose(a, [0, 1])).toEqual(P.trim(a));
        const c = P.compose(a, [h, 1]);
        for (const x of xs) {
          expect(Math.abs(P.evalReal(c, x) - P.evalReal(a, x + h))).toBeLessThanOrEqual(1e-9 * (1 + size(a, Math.abs(x) + Math.abs(h))));
        }
      }),
      { numRuns: 1000 },
    );
  });
});

describe('roots (fast-check, 1,000 runs each)', () => {
  // Well-conditioned cases: up to 8 distinct roots on a grid 0.5 apart within radius ~4.
  const rootSet = fc
    .uniqueArray(fc.record({ re: fc.integer({ min: -8, max: 8 }), im: fc.integer({ min: 0, max: 6 }) }), {
      minLength: 1,
      maxLength: 4,
      selector: (r) => `${r.re},${r.im}`,
    })
    .map((spec) => spec.flatMap((r): Complex[] => (r.im ? [cx(r.re / 2, r.im / 2), cx(r.re / 2, -r.im / 2)] : [cx(r.re / 2)])));

  it('roots → fromRoots → roots round trip', () => {
    fc.assert(
      fc.property(rootSet, fc.constantFrom(1, -2.5, 0.125), (roots, gain) => {
        const p = P.fromRoots(roots, gain);
        expect(P.lead(p)).toBe(gain);
        const got = polyRoots(p).slice().sort(compareComplex);
        const want = roots.slice().sort(compareComplex);
        expect(got.length).toBe(want.length);
        // Match each expected root to a distinct computed one (sorting may interleave near ties).
        const used = new Array<boolean>(got.length).fill(false);
        for (const w of want) {
          let best = -1;
          for (let j = 0; j < got.length; j++) if (!used[j] && (best < 0 || cabs(csub(got[j], w)) < cabs(csub(got[best], w)))) best = j;
          used[best] = true;
          expect(cabs(csub(got[best], w))).toBeLessThanOrEqual(1e-7 * (1 + cabs(w)));
        }
        // And the rebuilt polynomial has the same coefficients.
        const back = P.fromRoots(got, gain);
        back.forEach((c, i) => expect(Math.abs(c - p[i])).toBeLessThanOrEqual(1e-7 * (1 + Math.max(...p.map(Math.abs)))));
      }),
      { numRuns: 1000 },
    );
  });

  it('complex roots of a real polynomial come in exact conjugate pairs', () => {
    const realPoly = fc
      .array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: 2, maxLength: 12 })
      .filter((p) => Math.abs(p[p.length - 1]) > 1e-3);
    fc.assert(
      fc.property(realPoly, (p) => {
        const roots = polyRoots(p);
        expect(roots.length).toBe(P.degree(p));
        const upper = roots.filter((z) => z.im > 0);
        const lower = roots.filter((z) => z.im < 0);
        expect(upper.length).toBe(lower.length);
        for (const u of upper) expect(lower.some((l) => l.re === u.re && l.im === -u.im)).toBe(true);
      }),
      { numRuns: 1000 },
    );
  });
});
