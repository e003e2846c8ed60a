import { type Complex, cabs, compareComplex, cx } from './complex.ts';
import * as P from './poly.ts';
import { type Rational, rational } from './rational.ts';
import { polyRootsDetailed } from './roots.ts';

export interface Cancellation {
  /** The function with the common roots removed (same leading gain). */
  result: Rational;
  /** The roots removed from both numerator and denominator, each once per cancelled copy, sorted. */
  cancelled: Complex[];
}

/**
 * Removes roots shared by numerator and denominator. Roots come from polyRoots, which reports
 * a repeated root at its exact centre with its multiplicity, so a repeated pair such as
 * −8 ± j twice meets its partner as two exact copies (not as a circle of split roots that a
 * fixed clustering radius may or may not gather). A numerator root z and a denominator root p
 * match when |z − p| ≤ tol · max(1, |z|, |p|) — relative for large roots, absolute near the
 * origin — or within the accuracy their coefficients fix them to (the roots' error estimates,
 * capped at 1e-4 relative: a cluster of roots far from the origin is only so well determined
 * by expanded coefficients), and both are real or both complex; pairs are taken closest first, each root once,
 * and a complex match takes its conjugate along so the result stays real. The polynomials are
 * rebuilt from the remaining roots with the original leading coefficients (so the
 * high-frequency gain is kept exactly). Nothing matched: the input is returned unchanged.
 */
export function cancelCommon(r: Rational, tol = 1e-8): Cancellation {
  const num = P.trim(r.num);
  const den = P.trim(r.den);
  if (num.length <= 1 || den.length <= 1) return { result: r, cancelled: [] };
  const nd = polyRootsDetailed(num);
  const dd = polyRootsDetailed(den);
  const zs = nd.roots;
  const ps = dd.roots;
  const isReal = (z: Complex) => z.im === 0;
  // Candidate pairs among real roots and upper-half roots, closest first.
  const pairs: { d: number; i: number; j: number }[] = [];
  zs.forEach((z, i) => {
    if (z.im < 0) return;
    ps.forEach((p, j) => {
      if (p.im < 0 || isReal(z) !== isReal(p)) return;
      const d = Math.hypot(z.re - p.re, z.im - p.im);
      const size = Math.max(1, cabs(z), cabs(p));
      // Within tol, or within the accuracy the coefficients fix the two roots to (capped at 1e-4).
      const within = Math.max(tol * size, Math.min(2 * (nd.errors[i] + dd.errors[j]), 1e-4 * size));
      if (d <= within) pairs.push({ d, i, j });
    });
  });
  if (pairs.length === 0) return { result: r, cancelled: [] };
  pairs.sort((a, b) => a.d - b.d);
  const usedZ = new Uint8Array(zs.length);
  const usedP = new Uint8Array(ps.length);
  // The conjugate partner of a complex root: an unused exact mirror (roots are exactly symmetric).
  const mirror = (list: Complex[], used: Uint8Array, z: Complex) => list.findIndex((w, q) => !used[q] && w.re === z.re && w.im === -z.im);
  const cancelled: Complex[] = [];
  for (const { i, j } of pairs) {
    if (usedZ[i] || usedP[j]) continue;
    const z = zs[i];
    const p = ps[j];
    if (isReal(z)) {
      usedZ[i] = 1;
      usedP[j] = 1;
      cancelled.push(cx((z.re + p.re) / 2));
      continue;
    }
    usedZ[i] = 1;
    usedP[j] = 1;
    const zi = mirror(zs, usedZ, z);
    const pj = mirror(ps, usedP, p);
    if (zi < 0 || pj < 0) {
      usedZ[i] = 0;
      usedP[j] = 0;
      continue;
    }
    usedZ[zi] = 1;
    usedP[pj] = 1;
    const m = cx((z.re + p.re) / 2, (z.im + p.im) / 2);
    cancelled.push(m, cx(m.re, -m.im));
  }
  if (cancelled.length === 0) return { result: r, cancelled: [] };
  const newNum = P.fromRoots(
    zs.filter((_, i) => !usedZ[i]),
    P.lead(num),
  );
  const newDen = P.fromRoots(
    ps.filter((_, j) => !usedP[j]),
    P.lead(den),
  );
  return { result: rational(newNum, newDen), cancelled: cancelled.sort(compareComplex) };
}
