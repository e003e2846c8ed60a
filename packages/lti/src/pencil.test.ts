import { describe, expect, it } from 'vitest';
import { cabs, cx } from './complex.ts';
import * as P from './poly.ts';
import { factorPoly, factoredFromRoots, pencilRoots, pencilRootsContinued } from './pencil.ts';
import { closedLoopPolesDetailed } from './closed-loop.ts';
import { polyRoots } from './roots.ts';

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
    // |s|² = 1e-615 / 1 (constant over leading coefficient of the small-root factor 2s²): |s| = 3.1623e-308.
    for (const z of small) expect(Math.abs(cabs(z) / 3.1622776601683795e-308 - 1)).toBeLessThan(1e-6);
  });
});
