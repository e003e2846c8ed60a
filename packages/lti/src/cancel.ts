import { type Complex, cabs, cdiv, compareComplex, csub, cx } from './complex.ts';
import * as P from './poly.ts';
import { type Rational, rational } from './rational.ts';
import { type RootCluster, polyRoots, rootClusters } from './roots.ts';

export interface Cancellation {
  /** The function with the common roots removed (same leading gain). */
  result: Rational;
  /** The roots removed from both numerator and denominator, each once per cancelled copy, sorted. */
  cancelled: Complex[];
}

/** Roots closer than this (× (1 + |r|)) are treated as one repeated root before matching. */
const CLUSTER_TOL = 1e-4;

/**
 * Removes roots shared by numerator and denominator. Roots are grouped into clusters first
 * (a repeated root splits into a small circle, accuracy ~eps^(1/m)); a numerator cluster and a
 * denominator cluster match when their centres are within `tol` × max(1, |z|, |p|) — relative
 * for large roots, absolute near the origin — and min(multiplicities) copies cancel. Only the
 * upper half-plane and the real axis are matched; a complex match takes its conjugate along,
 * so the result stays real. The polynomials are rebuilt from the remaining roots with the
 * original leading coefficients (so the high-frequency gain is kept exactly). Nothing matched:
 * the input is returned unchanged.
 */
export function cancelCommon(r: Rational, tol = 1e-8): Cancellation {
  const num = P.trim(r.num);
  const den = P.trim(r.den);
  if (num.length <= 1 || den.length <= 1) return { result: r, cancelled: [] };
  const nc = refinedClusters(num);
  const dc = refinedClusters(den);
  const nLeft = nc.map((c) => c.multiplicity);
  const dLeft = dc.map((c) => c.multiplicity);
  const cancelled: Complex[] = [];
  // Cluster centres of repeated real roots are real to about this size (averaged members).
  const realTol = (z: Complex) => 1e-10 * Math.max(1, cabs(z));
  const isUpper = (c: RootCluster) => c.center.im >= -realTol(c.center);
  const conjIndex = (list: RootCluster[], i: number) => {
    const z = list[i].center;
    let best = -1;
    let bestD = Infinity;
    list.forEach((c, j) => {
      if (j === i || c.center.im >= -realTol(c.center)) return;
      const d = Math.hypot(c.center.re - z.re, c.center.im + z.im);
      if (d < bestD) {
        bestD = d;
        best = j;
      }
    });
    return best;
  };
  for (let i = 0; i < nc.length; i++) {
    if (!isUpper(nc[i]) || nLeft[i] === 0) continue;
    const z = nc[i].center;
    for (let j = 0; j < dc.length && nLeft[i] > 0; j++) {
      if (!isUpper(dc[j]) || dLeft[j] === 0) continue;
      const p = dc[j].center;
      if (cabs(csub(z, p)) > tol * Math.max(1, cabs(z), cabs(p))) continue;
      const k = Math.min(nLeft[i], dLeft[j]);
      const complex = Math.abs(z.im) > realTol(z) && Math.abs(p.im) > realTol(p);
      if (complex) {
        const ci = conjIndex(nc, i);
        const cj = conjIndex(dc, j);
        if (ci < 0 || cj < 0) continue;
        const kk = Math.min(k, nLeft[ci], dLeft[cj]);
        nLeft[i] -= kk;
        dLeft[j] -= kk;
        nLeft[ci] -= kk;
        dLeft[cj] -= kk;
        const m = cx((z.re + p.re) / 2, (z.im + p.im) / 2);
        for (let q = 0; q < kk; q++) cancelled.push(m, cx(m.re, -m.im));
      } else {
        nLeft[i] -= k;
        dLeft[j] -= k;
        for (let q = 0; q < k; q++) cancelled.push(cx((z.re + p.re) / 2));
      }
    }
  }
  if (cancelled.length === 0) return { result: r, cancelled: [] };
  const remaining = (clusters: RootCluster[], left: number[]) => {
    const out: Complex[] = [];
    clusters.forEach((c, i) => {
      if (left[i] === c.multiplicity) out.push(...c.members); // untouched: keep the individual roots
      else for (let q = 0; q < left[i]; q++) out.push(c.center);
    });
    return out;
  };
  const newNum = P.fromRoots(realPairs(remaining(nc, nLeft)), P.lead(num));
  const newDen = P.fromRoots(realPairs(remaining(dc, dLeft)), P.lead(den));
  return { result: rational(newNum, newDen), cancelled: cancelled.sort(compareComplex) };
}

/**
 * Clusters of roots with accurate centres: a root of multiplicity m is a SIMPLE root of the
 * (m−1)-th derivative, so Newton on that derivative from the members' mean restores full
 * accuracy (the mean alone is only good to ~eps^(1/m) after polishing moved members unevenly).
 */
function refinedClusters(p: readonly number[]): RootCluster[] {
  const clusters = rootClusters(polyRoots(p), CLUSTER_TOL);
  for (const c of clusters) {
    if (c.multiplicity < 2) continue;
    let q: number[] = P.trim(p);
    for (let k = 1; k < c.multiplicity; k++) q = P.derivative(q);
    const dq = P.derivative(q);
    let z = c.center;
    let fz = cabs(P.evalComplex(q, z));
    for (let it = 0; it < 10 && fz > 0; it++) {
      const d = P.evalComplex(dq, z);
      if (d.re === 0 && d.im === 0) break;
      const next = csub(z, cdiv(P.evalComplex(q, z), d));
      const fn = cabs(P.evalComplex(q, next));
      if (!(fn < fz)) break;
      z = next;
      fz = fn;
    }
    c.center = Math.abs(z.im) <= 1e-12 * Math.max(1, cabs(z)) ? cx(z.re) : z;
  }
  return clusters;
}

/** Forces exact conjugate symmetry of a root set before it is multiplied out. */
function realPairs(roots: Complex[]): Complex[] {
  return roots.map((z) => (Math.abs(z.im) <= 1e-14 * Math.max(1, cabs(z)) ? cx(z.re) : z));
}
