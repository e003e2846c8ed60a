import { describe, expect, it } from 'vitest';
import { cabs, cx } from './complex.ts';
import * as P from './poly.ts';
import { factorPoly, factoredFromRoots, pencilRoots, pencilRootsContinued } from './pencil.ts';
import { closedLoopPolesDetailed } from './closed-loop.ts';
import { polyRoots } from './roots.ts';
import { rootLocus } from './locus.ts';

describe('roots of A + k·B in product form', () => {
  it('(s + 1)^40 + 4: forty roots on |s + 1| = 4^(1/40) to 1e-13, where the coefficients fix them only to ±0.5', () => {
    const r = pencilRoots(factorPoly(P.pow([1, 1], 40)), factorPoly([4]), 1);
    expect(r.converged).toBe(true);
    const rad = 4 ** (1 / 40);
    for (const z of r.roots) expect(Math.abs(cabs(cx(z.re + 1, z.im)) - rad)).toBeLessThan(1e-13);
    // The same from the expanded coefficients (companion eigenvalues, polished) is far off: the
    // reason for the product form (this documents it, and fails should that ever change).
    const coeff = polyRoots(P.add(P.pow([1, 1], 40), [4]));
    expect(Math.max(...coeff.map((z) => Math.abs(cabs(cx(z.re + 1, z.im)) - rad)))).toBeGreaterThan(1e-2);
    // The closed-loop poles of 4/(s + 1)^40 come from the product form.
    const cl = closedLoopPolesDetailed([4], P.pow([1, 1], 40), 0);
    expect(cl.poles).toHaveLength(40);
    for (const z of cl.poles) expect(Math.abs(cabs(cx(z.re + 1, z.im)) - rad)).toBeLessThan(1e-12);
  });

  it('root sizes 1e-308 and 1 together (a 1e308 s dead time next to a 1 s lag) without under- or overflow', () => {
    // (s + 1)(s² + 6e-308 s + 1e-615) + (s² − 6e-308 s + 1e-615): roots −2 and ±j·3.162e-308 to first order.
    const A = factoredFromRoots([cx(-1), cx(-3e-308, 1e-308), cx(-3e-308, -1e-308)]);
    const B = factoredFromRoots([cx(3e-308, 1e-308), cx(3e-308, -1e-308)]);
    const r = pencilRootsContinued(A, B, 1);
    expect(r.converged).toBe(true);
    const big = r.roots.find((z) => cabs(z) > 1)!;
    expect(big.re).toBeCloseTo(-2, 12);
    const small = r.roots.filter((z) => cabs(z) < 1);
    // |s|² = 1e-615 / 1 (constant over leading coefficient of the small-root factor 2s²): |s| = √10·1e-308.
    for (const z of small) expect(Math.abs(cabs(z) / (Math.sqrt(10) * 1e-308) - 1)).toBeLessThan(1e-6);
  });

  it('roots shared by A and B are roots at every gain: s²·(s² + 3s + 2) + k·s² converges to 0, 0 and the quadratic formula', () => {
    // Found by the expression fuzzer: 1e-300·s²/(s²(s + 0.01)²(s − 0.01)) made the locus creep
    // towards the shared double root without converging, thousands of steps deep.
    const A = factorPoly(P.fromDescending([1, 3, 2, 0, 0]));
    const B = factorPoly([0, 0, 1]);
    for (const k of [0.1, 0.25, 2, 50]) {
      const r = pencilRoots(A, B, k);
      expect(r.converged).toBe(true);
      expect(r.roots).toHaveLength(4);
      expect(r.roots.filter((z) => z.re === 0 && z.im === 0)).toHaveLength(2);
      // s² + 3s + 2 + k = 0: s = (−3 ± √(1 − 4k))/2 (quadratic formula).
      const disc = 1 - 4 * k;
      const want =
        disc >= 0
          ? [cx((-3 + Math.sqrt(disc)) / 2), cx((-3 - Math.sqrt(disc)) / 2)]
          : [cx(-1.5, Math.sqrt(-disc) / 2), cx(-1.5, -Math.sqrt(-disc) / 2)];
      const moving = r.roots.filter((z) => z.re !== 0 || z.im !== 0);
      for (const w of want) expect(Math.min(...moving.map((z) => cabs(cx(z.re - w.re, z.im - w.im))))).toBeLessThan(1e-12);
    }
  });

  it('a locus with a shared double root at the origin ends converged and untruncated, the shared roots fixed', () => {
    const L = rootLocus([0, 0, 1e-300], P.fromRoots([cx(0), cx(0), cx(-0.01), cx(-0.01), cx(0.01)]), { samples: 24 });
    expect(L.accuracy.unconverged).toBe(0);
    expect(L.accuracy.truncated).toBe(false);
    // The other three satisfy the cubic (s + 0.01)²(s − 0.01) + k·1e-300 = 0: their product is
    // −(k·1e-300 − 1e-6) (Vieta), checked at every traced gain.
    for (let i = 0; i < L.gains.length; i++) {
      const pts = L.branches.map((b) => b[i].s);
      expect(pts.filter((z) => z.re === 0 && z.im === 0).length).toBeGreaterThanOrEqual(2);
    }
    const i = L.gains.length - 1;
    const k = L.gains[i];
    const moving = L.branches.map((b) => b[i].s).filter((z) => z.re !== 0 || z.im !== 0);
    expect(moving).toHaveLength(3);
    let pr = 1;
    let pi = 0;
    for (const z of moving) [pr, pi] = [pr * z.re - pi * z.im, pr * z.im + pi * z.re];
    expect(Math.abs(pr / -(k * 1e-300 - 1e-6) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(pi)).toBeLessThan(1e-9 * Math.abs(pr));
  });
});
