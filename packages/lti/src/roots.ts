import { type Complex, cabs, cdiv, compareComplex, csub, cx } from './complex.ts';
import { InputError, MAX_ORDER, assertFinite } from './errors.ts';
import { type Poly, derivative, evalComplex, trim } from './poly.ts';
import { companionEigenvalues } from './companion.ts';
import { rootMultiplicities } from './multiplicity.ts';

/**
 * The one home for polynomial roots (the locus, margins, reductions and graph's sweeps all
 * come here): companion eigenvalues (companion.ts), Newton polishing on the original
 * polynomial, exact conjugate pairing, and repeated roots recognised by their numerical
 * multiplicity (multiplicity.ts) and reported at their exact centre — (s + 1)^40 gives −1
 * forty times, not a circle of radius 0.4. Root following between neighbouring problems lives
 * in root-match.ts, the product-form solver for D + k·N in pencil.ts.
 */
export interface PolyRootsDetail {
  /** The roots, sorted (compareComplex); a validated m-fold root appears m times at its centre. */
  roots: Complex[];
  /** Estimated absolute error of each root (same order). */
  errors: number[];
  /** Validated multiple roots: centre, multiplicity and the raw computed roots they replace. */
  multiple: RootCluster[];
  /** max over roots of error / max(|root|, 1e-8·largest |root|): 0 for exact roots. */
  worstRelativeError: number;
}

export interface PolyRootsOptions {
  /** Highest degree accepted (default MAX_ORDER; breakaway polynomials of a locus need up to 2·MAX_ORDER). */
  maxDegree?: number;
}

/**
 * All roots of a real polynomial (ascending coefficients). Complex roots come as exact
 * conjugate pairs, repeated roots at their exact centre; the result is sorted (compareComplex).
 */
export function polyRoots(p: Poly, opts: PolyRootsOptions = {}): Complex[] {
  return polyRootsDetailed(p, opts).roots;
}

export function polyRootsDetailed(p: Poly, opts: PolyRootsOptions = {}): PolyRootsDetail {
  assertFinite(p, 'polynomial coefficients');
  let c = trim(p);
  if (c.length === 0) throw new InputError('the zero polynomial has no defined roots');
  const maxDegree = opts.maxDegree ?? MAX_ORDER;
  if (c.length - 1 > maxDegree) {
    throw new InputError(`polynomial of degree ${c.length - 1} is above the limit of ${maxDegree}`);
  }
  let zeros = 0;
  while (c.length > 1 && c[0] === 0) {
    zeros++;
    c = c.slice(1);
  }
  // Scale by a power of two (exact; the roots do not change) so that the largest coefficient is
  // near 1: 1e300-size coefficients would overflow b² − 4ac and Horner sums on the way.
  let big = 0;
  for (const x of c) big = Math.max(big, Math.abs(x));
  const e = Math.round(Math.log2(big));
  if (Math.abs(e) > 64 && Number.isFinite(e)) {
    // In two factors: 2^1063 (for subnormal coefficients) is itself out of range.
    const h = Math.trunc(-e / 2);
    const f1 = 2 ** h;
    const f2 = 2 ** (-e - h);
    c = c.map((x) => x * f1 * f2);
  }
  const n = c.length - 1;
  let raw: Complex[] = [];
  if (n === 1) raw = [cx(-c[0] / c[1])];
  else if (n === 2) raw = quadraticRoots(c[2], c[1], c[0]);
  else if (n > 2) raw = companionEigenvalues(c);
  // Multiplicity is judged on the unpolished eigenvalues (exactly conjugate-symmetric, and the
  // mean of a split multiple root is accurate there; Newton polishing pulls its members apart
  // unevenly), then the simple roots are polished (on the deflated polynomial when there are
  // multiple roots) and paired.
  const found = n >= 2 ? rootMultiplicities(c, raw) : { roots: raw, errors: raw.map(() => 0), multiple: [] };
  if (n > 2 || found.multiple.length) polishSimple(c, found);
  const pairs: { z: Complex; e: number }[] = [];
  for (let i = 0; i < zeros; i++) pairs.push({ z: cx(0), e: 0 });
  found.roots.forEach((z, i) => pairs.push({ z, e: found.errors[i] }));
  pairs.sort((a, b) => compareComplex(a.z, b.z));
  const multiple: RootCluster[] = found.multiple.map((m) => ({ center: m.center, multiplicity: m.multiplicity, members: m.members }));
  if (zeros >= 2) multiple.push({ center: cx(0), multiplicity: zeros, members: new Array<Complex>(zeros).fill(cx(0)) });
  const roots = pairs.map((q) => q.z);
  const errors = pairs.map((q) => q.e);
  return { roots, errors, multiple, worstRelativeError: worstRelative(roots, errors) };
}

/**
 * Polishes the simple roots by Newton's method on p, pairs them exactly, and estimates each
 * one's error from the rounding level of p's coefficients, K·eps·Σ|p_k||z|^k / |p′(z)| (first
 * order; conservative where a multiple root nearby keeps p′ small).
 */
function polishSimple(
  c: number[],
  found: { roots: Complex[]; errors: number[]; multiple: { center: Complex; multiplicity: number }[] },
): void {
  const isMultiple = (z: Complex) => found.multiple.some((m) => m.center.re === z.re && m.center.im === z.im);
  const simple: number[] = [];
  found.roots.forEach((z, i) => {
    if (!isMultiple(z)) simple.push(i);
  });
  if (simple.length === 0) return;
  const polished = symmetrize(
    simple.map((i) => polishRoot(c, found.roots[i])),
    c,
  );
  const dc = derivative(c);
  const K = 8 * c.length;
  simple.forEach((i, j) => {
    const w = polished[j];
    found.roots[i] = w;
    let s = 0;
    const a = cabs(w);
    for (let k = c.length - 1; k >= 0; k--) s = s * a + Math.abs(c[k]);
    const d = cabs(evalComplex(dc, w));
    if (d > 0) found.errors[i] = (K * 2.220446049250313e-16 * s) / d;
  });
}

/** max error / max(|z|, 1e-8·scale): how many digits the least accurate root has. */
export function worstRelative(roots: readonly Complex[], errors: readonly number[]): number {
  let scale = 0;
  for (const z of roots) scale = Math.max(scale, cabs(z));
  let worst = 0;
  roots.forEach((z, i) => {
    if (errors[i] > 0) worst = Math.max(worst, errors[i] / Math.max(cabs(z), 1e-8 * scale, Number.MIN_VALUE));
  });
  return worst;
}

/** Roots of a·s² + b·s + c without cancellation error. */
function quadraticRoots(a: number, b: number, c: number): Complex[] {
  const disc = b * b - 4 * a * c;
  if (disc >= 0) {
    const q = -0.5 * (b + Math.sign(b || 1) * Math.sqrt(disc));
    const r1 = q / a;
    const r2 = q !== 0 ? c / q : 0;
    return [cx(r1), cx(r2)];
  }
  const re = -b / (2 * a);
  const im = Math.sqrt(-disc) / (2 * Math.abs(a));
  return [cx(re, im), cx(re, -im)];
}

/** A few Newton steps on the original polynomial; keeps the step only while |p| decreases. */
export function polishRoot(c: readonly number[], z0: Complex, steps = 6): Complex {
  const d = derivative(c);
  let z = z0;
  let fz = cabs(evalComplex(c, z));
  for (let it = 0; it < steps && fz > 0; it++) {
    const dp = evalComplex(d, z);
    if (dp.re === 0 && dp.im === 0) break;
    const next = csub(z, cdiv(evalComplex(c, z), dp));
    const fn = cabs(evalComplex(c, next));
    if (!(fn < fz)) break;
    z = next;
    fz = fn;
  }
  return z;
}
const polish = (c: readonly number[], z: Complex) => polishRoot(c, z);

/**
 * Makes the root set exactly conjugate-symmetric: near-real roots become real, and each
 * complex root is paired with its nearest conjugate partner and the pair averaged.
 */
function symmetrize(roots: Complex[], c: readonly number[]): Complex[] {
  const scale = Math.max(1, ...roots.map(cabs));
  const realTol = 1e-12 * scale;
  const out: Complex[] = [];
  const upper: Complex[] = [];
  const lower: Complex[] = [];
  for (const z of roots) {
    if (Math.abs(z.im) <= realTol) out.push(cx(z.re));
    else (z.im > 0 ? upper : lower).push(z);
  }
  // Unpaired leftovers (odd counts) are forced real: a real polynomial has no lone complex root.
  const used = new Array<boolean>(lower.length).fill(false);
  for (const u of upper) {
    let best = -1;
    let bestD = Infinity;
    for (let j = 0; j < lower.length; j++) {
      if (used[j]) continue;
      const dd = Math.hypot(u.re - lower[j].re, u.im + lower[j].im);
      if (dd < bestD) {
        bestD = dd;
        best = j;
      }
    }
    if (best < 0) {
      out.push(polish(c, cx(u.re)));
      continue;
    }
    used[best] = true;
    const re = (u.re + lower[best].re) / 2;
    const im = (u.im - lower[best].im) / 2;
    out.push(cx(re, im), cx(re, -im));
  }
  lower.forEach((l, j) => {
    if (!used[j]) out.push(polish(c, cx(l.re)));
  });
  return out;
}

export interface RootCluster {
  center: Complex;
  multiplicity: number;
  members: Complex[];
}

/**
 * Groups roots that lie within `tol` × (1 + |r|) of each other, by distance alone (for display
 * and for comparing root sets; `polyRootsDetailed` decides multiplicity properly). Centers are
 * member means (conjugate-symmetric input gives conjugate-symmetric centers).
 */
export function rootClusters(roots: readonly Complex[], tol = 1e-4): RootCluster[] {
  const clusters: RootCluster[] = [];
  for (const r of roots) {
    const hit = clusters.find((cl) => cabs(csub(cl.center, r)) <= tol * (1 + cabs(r)));
    if (hit) {
      hit.members.push(r);
      hit.multiplicity++;
      const k = hit.multiplicity;
      hit.center = cx(hit.center.re + (r.re - hit.center.re) / k, hit.center.im + (r.im - hit.center.im) / k);
    } else clusters.push({ center: r, multiplicity: 1, members: [r] });
  }
  return clusters;
}

/**
 * How far a computed root set is from an expected one: each expected root is matched (greedily,
 * nearest first come) to a distinct computed root and the worst distance is returned, divided by
 * max(relativeFloor, |expected|) when a floor is given (absolute distance otherwise). Infinity
 * when the counts differ. Used to compare pole sets from two independent methods.
 */
export function rootSetMismatch(got: readonly Complex[], want: readonly Complex[], relativeFloor?: number): number {
  if (got.length !== want.length) return Infinity;
  const used = new Array<boolean>(got.length).fill(false);
  let worst = 0;
  for (const w of want) {
    let best = -1;
    let bestD = Infinity;
    for (let i = 0; i < got.length; i++) {
      if (used[i]) continue;
      const d = cabs(csub(got[i], w));
      if (d < bestD) {
        bestD = d;
        best = i;
      }
    }
    used[best] = true;
    worst = Math.max(worst, relativeFloor === undefined ? bestD : bestD / Math.max(relativeFloor, cabs(w)));
  }
  return worst;
}
