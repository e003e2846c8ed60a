import { type Complex, cabs, cdiv, compareComplex, csub, cx } from './complex.ts';
import { InputError, MAX_ORDER, assertFinite } from './errors.ts';
import { type Poly, derivative, evalComplex, trim } from './poly.ts';
import { matrixEigenvalues } from './eigen.ts';

/**
 * All roots of a real polynomial (ascending coefficients), as eigenvalues of its balanced
 * companion matrix (ml-matrix), then polished by Newton's method on the original polynomial.
 * Complex roots come out as exact conjugate pairs; the result is sorted (compareComplex).
 * Repeated roots are only as accurate as their conditioning allows (~eps^(1/m)): use
 * rootClusters to report them.
 */
export function polyRoots(p: Poly): Complex[] {
  assertFinite(p, 'polynomial coefficients');
  let c = trim(p);
  if (c.length === 0) throw new InputError('the zero polynomial has no defined roots');
  if (c.length - 1 > MAX_ORDER) {
    throw new InputError(`polynomial of degree ${c.length - 1} is above the limit of ${MAX_ORDER}`);
  }
  const roots: Complex[] = [];
  let zeros = 0;
  while (c.length > 1 && c[0] === 0) {
    zeros++;
    c = c.slice(1);
  }
  for (let i = 0; i < zeros; i++) roots.push(cx(0, 0));
  const n = c.length - 1;
  if (n === 1) roots.push(cx(-c[0] / c[1]));
  else if (n === 2) roots.push(...quadraticRoots(c[2], c[1], c[0]));
  else if (n > 2) {
    const raw = companionEigenvalues(c);
    roots.push(...symmetrize(raw.map((z) => polish(c, z)), c));
  }
  return roots.sort(compareComplex);
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

function companionEigenvalues(c: readonly number[]): Complex[] {
  const n = c.length - 1;
  const lead = c[n];
  const m = new Array<number[]>(n);
  for (let i = 0; i < n; i++) m[i] = new Array<number>(n).fill(0);
  // Upper Hessenberg companion: first row −c[n−1..0]/lead, ones on the subdiagonal.
  for (let j = 0; j < n; j++) m[0][j] = -c[n - 1 - j] / lead;
  for (let i = 1; i < n; i++) m[i][i - 1] = 1;
  return matrixEigenvalues(m, 'companion matrix of the polynomial', true, true);
}

/** A few Newton steps on the original polynomial; keeps the step only while |p| decreases. */
function polish(c: readonly number[], z0: Complex): Complex {
  const d = derivative(c);
  let z = z0;
  let fz = cabs(evalComplex(c, z));
  for (let it = 0; it < 6 && fz > 0; it++) {
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
 * Groups roots that lie within `tol` × (1 + |r|) of each other (repeated roots split by
 * rounding into a small circle). Centers are member means (conjugate-symmetric input gives
 * conjugate-symmetric centers).
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


/** Parlett–Reinsch diagonal balancing of a square matrix, in place (also used for assembled state matrices). */

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
