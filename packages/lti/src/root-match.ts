import { type Complex, cx } from './complex.ts';

/**
 * Following roots from one problem to a neighbouring one (the next gain of a locus, the next
 * sample of a parameter sweep): the one home of root matching.
 */

/**
 * Pairs the roots of one sample with those of the next: repeatedly takes the globally closest
 * unpaired pair (greedy over sorted distances). Returns perm with next[perm[i]] ↔ prev[i]
 * (−1 where `next` has fewer roots).
 */
export function matchRoots(prev: readonly Complex[], next: readonly Complex[]): number[] {
  const pairs: { d: number; i: number; j: number }[] = [];
  for (let i = 0; i < prev.length; i++) {
    for (let j = 0; j < next.length; j++) pairs.push({ d: Math.hypot(prev[i].re - next[j].re, prev[i].im - next[j].im), i, j });
  }
  pairs.sort((a, b) => a.d - b.d);
  const perm = new Array<number>(prev.length).fill(-1);
  const taken = new Uint8Array(next.length);
  let left = Math.min(prev.length, next.length);
  for (const { i, j } of pairs) {
    if (left === 0) break;
    if (perm[i] >= 0 || taken[j]) continue;
    perm[i] = j;
    taken[j] = 1;
    left--;
  }
  return perm;
}

/** `next` reordered to follow `prev` (same count): out[i] continues prev[i]. */
export function followRoots(prev: readonly Complex[], next: readonly Complex[]): Complex[] {
  if (next.length !== prev.length) throw new Error(`root count changed from ${prev.length} to ${next.length}`);
  return matchRoots(prev, next).map((j) => next[j]);
}

/**
 * Exact conjugate symmetry of a root set of a real polynomial, in place of the given order:
 * near-real roots become real, every other root is paired with its nearest mirror image and the
 * pair averaged. A root is near-real when |Im| ≤ max(realTol·size, tol_i) and two roots are
 * mirror partners when they lie within max(pairTol·size, tol_i + tol_j) of each other's mirror
 * (size = |z| + scale; tol = optional per-root absolute uncertainty, capped at 1e-4·size).
 * Null when some root has no partner.
 */
export function conjugateSymmetric(
  roots: readonly Complex[],
  scale: number,
  realTol = 1e-10,
  pairTol = 1e-7,
  tol?: ArrayLike<number>,
): Complex[] | null {
  const n = roots.length;
  const out: Complex[] = new Array<Complex>(n);
  const paired = new Uint8Array(n);
  // Per-root tolerance, capped at 1e-4·size (no closures: this runs at every traced gain).
  const tl = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const cap = 1e-4 * (Math.abs(roots[i].re) + Math.abs(roots[i].im) + scale);
    const t = tol ? tol[i] : 0;
    tl[i] = Number.isFinite(t) ? Math.min(t, cap) : cap;
  }
  for (let i = 0; i < n; i++) {
    if (paired[i]) continue;
    const zi = roots[i];
    const size = Math.hypot(zi.re, zi.im) + scale;
    if (Math.abs(zi.im) <= Math.max(realTol * size, tl[i])) {
      out[i] = cx(zi.re);
      paired[i] = 1;
      continue;
    }
    let best = -1;
    let bestD = Infinity;
    for (let j = 0; j < n; j++) {
      if (j === i || paired[j]) continue;
      const d = Math.hypot(zi.re - roots[j].re, zi.im + roots[j].im);
      if (d < bestD) {
        bestD = d;
        best = j;
      }
    }
    if (best < 0 || bestD > Math.max(pairTol * size, tl[i] + tl[best])) return null;
    const r = 0.5 * (zi.re + roots[best].re);
    const m = 0.5 * (zi.im - roots[best].im);
    out[i] = cx(r, zi.im >= 0 ? Math.abs(m) : -Math.abs(m));
    out[best] = cx(r, -out[i].im);
    paired[i] = 1;
    paired[best] = 1;
  }
  return out;
}
