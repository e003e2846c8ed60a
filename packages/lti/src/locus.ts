import { matrixEigenvalues } from './eigen.ts';
import { type Complex, cabs, carg, cdiv, cx } from './complex.ts';
import { InputError, MAX_ORDER, assertFinite } from './errors.ts';
import * as P from './poly.ts';
import { polyRoots, rootClusters } from './roots.ts';

/**
 * Root-locus geometry of the characteristic equation 1 + k·N(s)/D(s) = 0, i.e. the roots of
 * D(s) + k·N(s), for k > 0 (default) or k < 0 (`negative`). Rules: Ogata, Sec. 6-2; Nise,
 * Ch. 8 (from memory). Gains are signed (k < 0 on the negative locus) and refer to N and D
 * exactly as given (no normalisation), so `gainAtPoint` = −D(s)/N(s) matches the trace.
 */
export interface LocusPoint {
  s: Complex;
  k: number;
}
export interface LocusAngle {
  at: Complex;
  /** The principal direction, degrees in (−180, 180]. */
  angleDeg: number;
  /** Multiplicity μ of the pole (zero); μ branches leave (arrive) at anglesDeg. */
  multiplicity: number;
  anglesDeg: number[];
}
export interface RootLocus {
  negative: boolean;
  /** The polynomials as given (ascending). */
  num: number[];
  den: number[];
  poles: Complex[];
  zeros: Complex[];
  asymptotes: { centroid: number | null; anglesDeg: number[] };
  /** Real-axis parts of the locus, ascending; ends may be ±Infinity. */
  realAxisSegments: { from: number; to: number }[];
  /** Breakaway / break-in points (real and complex) with their gains; `branches` meet there. */
  breakaways: { s: Complex; gain: number; branches: number }[];
  /** Imaginary-axis crossings s = ±jω (ω ≥ 0) with the exact gain. */
  crossings: { omega: number; gain: number }[];
  departures: LocusAngle[];
  arrivals: LocusAngle[];
  /** One array per closed-loop pole path, gains monotone in |k|; special points are members. */
  branches: LocusPoint[][];
  /** The traced gains, ascending in |k|. */
  gains: number[];
  kRange: [number, number];
  /** Continuity bound honoured between consecutive branch points: |Δs| ≤ fraction·(|s| + scale). */
  stepBound: { fraction: number; scale: number };
  /**
   * n = m only: the gain k* = −lead D/lead N where D + kN loses a degree (one root passes through
   * infinity), when it lies in the traced range; the trace steps over |k| within 0.1 % of it (so a
   * special point at exactly k* is reported but not traced), and branches split there. Else null.
   */
  degreeDropGain: number | null;
}

export interface RootLocusOptions {
  negative?: boolean;
  /** Gain magnitudes |k| traced: from kMin (default 0) to kMax (default: far enough that branches reach their zeros/asymptotes). */
  kMin?: number;
  kMax?: number;
  /** Number of base gain samples (default 400); adaptive refinement adds more where roots move fast. */
  samples?: number;
  /** Continuity fraction (default 0.05). */
  stepFraction?: number;
}

const DEG = 180 / Math.PI;
const normDeg = (a: number): number => {
  let x = a % 360;
  if (x <= -180) x += 360;
  if (x > 180) x -= 360;
  return x;
};

export function rootLocus(num: P.Poly, den: P.Poly, opts: RootLocusOptions = {}): RootLocus {
  const N = checkPoly(num, 'numerator N(s)');
  const D = checkPoly(den, 'denominator D(s)');
  if (N.length === 0) throw new InputError('numerator N(s) is zero: 1 + k·N/D = 0 has no gain to sweep', { field: 'numerator' });
  const n = D.length - 1;
  const m = N.length - 1;
  if (m > n) {
    throw new InputError(`improper loop: numerator degree ${m} is above denominator degree ${n} (k·N/D must be proper)`, { field: 'numerator' });
  }
  const negative = opts.negative === true;
  const sgn = negative ? -1 : 1;
  const fraction = opts.stepFraction ?? 0.05;
  if (!(fraction > 0 && fraction < 1)) throw new InputError(`stepFraction must lie in (0, 1), got ${fraction}`, { field: 'stepFraction' });
  const kMin = opts.kMin ?? 0;
  if (!Number.isFinite(kMin) || kMin < 0) {
    throw new InputError(`kMin must be a finite gain magnitude ≥ 0 (use negative: true for the k < 0 locus), got ${kMin}`, { field: 'kMin' });
  }
  if (opts.kMax !== undefined && (!Number.isFinite(opts.kMax) || opts.kMax <= 0)) {
    throw new InputError(`kMax must be a finite gain magnitude > 0, got ${opts.kMax}`, { field: 'kMax' });
  }
  if (opts.kMax !== undefined && opts.kMax <= kMin) {
    throw new InputError(`k range reversed: kMin ${kMin} is not below kMax ${opts.kMax}`, { field: 'kMax' });
  }
  const samples = opts.samples ?? 400;
  if (!Number.isInteger(samples) || samples < 2 || samples > 100000) {
    throw new InputError(`samples must be a whole number from 2 to 100000, got ${samples}`, { field: 'samples' });
  }

  const poleClusters = clusterRoots(n > 0 ? polyRoots(D) : [], D);
  const zeroClusters = clusterRoots(m > 0 ? polyRoots(N) : [], N);
  const poles = expand(poleClusters);
  const zeros = expand(zeroClusters);
  const c = P.lead(N) / P.lead(D);
  const kcPositive = sgn * c > 0;

  // Asymptotes, from the coefficients: Σpoles = −d_{n−1}/d_n, Σzeros = −n_{m−1}/n_m.
  const asymptotes: RootLocus['asymptotes'] = { centroid: null, anglesDeg: [] };
  if (n > m) {
    const sumP = n > 0 ? -(D[n - 1] ?? 0) / D[n] : 0;
    const sumZ = m > 0 ? -(N[m - 1] ?? 0) / N[m] : 0;
    asymptotes.centroid = (sumP - sumZ) / (n - m);
    for (let q = 0; q < n - m; q++) asymptotes.anglesDeg.push(normDeg(((kcPositive ? 2 * q + 1 : 2 * q) * 180) / (n - m)));
  }

  const breakaways = findBreakaways(N, D, sgn);
  const crossings = findCrossings(N, D, sgn);
  const realAxisSegments = realSegments(N, D, sgn, poles, zeros);
  const kcAngle = kcPositive ? 0 : 180;
  const departures: LocusAngle[] = [];
  for (const pc of poleClusters) {
    if (pc.center.im === 0) continue;
    let sum = kcAngle - 180;
    for (const z of zeros) sum += carg(csubC(pc.center, z)) * DEG;
    for (const p of poleClusters) if (p !== pc) sum -= p.multiplicity * carg(csubC(pc.center, p.center)) * DEG;
    departures.push(angleEntry(pc.center, sum, pc.multiplicity));
  }
  const arrivals: LocusAngle[] = [];
  for (const zc of zeroClusters) {
    if (zc.center.im === 0) continue;
    let sum = 180 - kcAngle;
    for (const z of zeroClusters) if (z !== zc) sum -= z.multiplicity * carg(csubC(zc.center, z.center)) * DEG;
    for (const p of poles) sum += carg(csubC(zc.center, p)) * DEG;
    arrivals.push(angleEntry(zc.center, sum, zc.multiplicity));
  }

  // Scale for the continuity bound: median size of the finite features (1 if there are none).
  const sizes = [...poles, ...zeros, ...breakaways.map((b) => b.s)].map(cabs).concat(crossings.map((x) => x.omega)).filter((x) => x > 0);
  sizes.sort((a, b) => a - b);
  const scale = sizes.length ? sizes[Math.floor(sizes.length / 2)] : 1;
  const R = sizes.length ? sizes[sizes.length - 1] : 1;

  const special = [...breakaways.map((b) => Math.abs(b.gain)), ...crossings.map((x) => Math.abs(x.gain))];
  const kMax = opts.kMax ?? autoKMax(N, D, n, m, R, zeroClusters, special);
  if (kMax <= kMin) throw new InputError(`k range reversed: kMin ${kMin} is not below kMax ${kMax}`, { field: 'kMin' });

  const tracer = new Tracer(N, D, sgn, fraction, scale, breakaways, crossings);
  const { branches, gains, kStar } = tracer.trace(kMin, kMax, samples, poles);

  return {
    negative,
    num: N,
    den: D,
    poles,
    zeros,
    asymptotes,
    realAxisSegments,
    breakaways,
    crossings,
    departures,
    arrivals,
    branches,
    gains,
    kRange: [sgn * kMin, sgn * kMax],
    stepBound: { fraction, scale },
    degreeDropGain: Number.isFinite(kStar) ? sgn * kStar : null,
  };
}

/** The gain that puts a closed-loop pole at s: k = −D(s)/N(s) (real part; exact on the locus). */
export function gainAtPoint(num: P.Poly, den: P.Poly, s: Complex): number {
  const nv = P.evalComplex(num, s);
  const dv = P.evalComplex(den, s);
  if (nv.re === 0 && nv.im === 0) return Infinity;
  return -cdiv(dv, nv).re;
}

/**
 * The point of the traced locus nearest to s: the branch, the segment start index, the
 * projection of s onto that segment, and the gain there (−D/N at the projection, kept within
 * the segment's gains). The UI can set this gain directly.
 */
export function nearestLocusPoint(
  locus: RootLocus,
  s: Complex,
): { branch: number; index: number; s: Complex; k: number; distance: number } | null {
  let best: { branch: number; index: number; s: Complex; t: number; distance: number } | null = null;
  locus.branches.forEach((br, b) => {
    for (let i = 0; i < br.length; i++) {
      const a = br[i].s;
      const e = i + 1 < br.length ? br[i + 1].s : a;
      const dx = e.re - a.re;
      const dy = e.im - a.im;
      const l2 = dx * dx + dy * dy;
      const t = l2 > 0 ? Math.max(0, Math.min(1, ((s.re - a.re) * dx + (s.im - a.im) * dy) / l2)) : 0;
      const p = cx(a.re + t * dx, a.im + t * dy);
      const d = Math.hypot(s.re - p.re, s.im - p.im);
      if (!best || d < best.distance) best = { branch: b, index: i, s: p, t, distance: d };
    }
  });
  if (!best) return null;
  const hit = best as { branch: number; index: number; s: Complex; t: number; distance: number };
  const br = locus.branches[hit.branch];
  const ka = br[hit.index].k;
  const kb = (br[hit.index + 1] ?? br[hit.index]).k;
  let k = gainAtPoint(locus.num, locus.den, hit.s);
  const lo = Math.min(ka, kb);
  const hi = Math.max(ka, kb);
  if (!Number.isFinite(k) || k < lo || k > hi) k = ka + hit.t * (kb - ka);
  return { branch: hit.branch, index: hit.index, s: hit.s, k, distance: hit.distance };
}

// ————————————————————————————————————————————————————————————— geometry

function checkPoly(p: P.Poly, what: string): number[] {
  assertFinite(p, what);
  const t = P.trim(p);
  if (t.length - 1 > MAX_ORDER) throw new InputError(`${what}: order ${t.length - 1} is above the limit of ${MAX_ORDER}`, { field: what });
  return t;
}

const csubC = (a: Complex, b: Complex): Complex => cx(a.re - b.re, a.im - b.im);

interface Cluster {
  center: Complex;
  multiplicity: number;
}

/**
 * Groups numerically split repeated roots and snaps them to one centre. A root of multiplicity μ
 * is a simple root of the (μ−1)-th derivative, so the centre is polished there by Newton's method
 * (full precision instead of the ~eps^(1/μ) scatter of the split roots).
 */
function clusterRoots(roots: Complex[], p?: readonly number[]): Cluster[] {
  return rootClusters(roots, 1e-5).map((cl) => {
    let z = cl.center;
    if (p && cl.multiplicity > 1) {
      let q: number[] = p.slice();
      for (let i = 1; i < cl.multiplicity; i++) q = P.derivative(q);
      z = newtonComplex(q, z);
    }
    const im = Math.abs(z.im) <= 1e-9 * (1 + cabs(z)) ? 0 : z.im;
    return { center: cx(z.re, im), multiplicity: cl.multiplicity };
  });
}

function newtonComplex(q: readonly number[], z0: Complex): Complex {
  const d = P.derivative(q);
  let z = z0;
  let fz = cabs(P.evalComplex(q, z));
  for (let i = 0; i < 8 && fz > 0; i++) {
    const step = cdiv(P.evalComplex(q, z), P.evalComplex(d, z));
    const nz = cx(z.re - step.re, z.im - step.im);
    const fn = cabs(P.evalComplex(q, nz));
    if (!(fn < fz)) break;
    z = nz;
    fz = fn;
  }
  return z;
}
const expand = (cls: Cluster[]): Complex[] => cls.flatMap((c) => new Array<Complex>(c.multiplicity).fill(c.center));

function angleEntry(at: Complex, sumDeg: number, mu: number): LocusAngle {
  const anglesDeg: number[] = [];
  for (let q = 0; q < mu; q++) anglesDeg.push(normDeg((sumDeg + 360 * q) / mu));
  return { at, angleDeg: anglesDeg[0], multiplicity: mu, anglesDeg };
}

/** Σ|coefficient|·|s|^i: the size against which a polynomial value at s counts as zero. */
function polyMagnitude(p: readonly number[], s: Complex): number {
  const r = cabs(s);
  let v = 0;
  for (let i = p.length - 1; i >= 0; i--) v = v * r + Math.abs(p[i]);
  return v;
}

/** Breakaway/break-in points: roots of N·D' − N'·D with real k = −D/N of the locus's sign. */
function findBreakaways(N: number[], D: number[], sgn: number): RootLocus['breakaways'] {
  const B = P.sub(P.mul(N, P.derivative(D)), P.mul(P.derivative(N), D));
  if (B.length < 2) return [];
  const clusters = rootClusters(rootsAnyDegree(B), 1e-5);
  const out: RootLocus['breakaways'] = [];
  for (const cl of clusters) {
    const s = Math.abs(cl.center.im) <= 1e-9 * (1 + cabs(cl.center)) ? cx(cl.center.re) : cl.center;
    const nv = P.evalComplex(N, s);
    const dv = P.evalComplex(D, s);
    if (cabs(nv) <= 1e-10 * polyMagnitude(N, s)) continue; // a repeated zero (k = ∞)
    if (cabs(dv) <= 1e-10 * polyMagnitude(D, s)) continue; // a repeated pole (k = 0)
    const k = cdiv(dv, nv);
    const kr = -k.re;
    // Complex gain: not on any real-gain locus. The bound is tight because near a (near-)triple
    // point k(s) ≈ k0 + a(s − c)³ has critical points off the axis with Im k ~ a·r³, tiny but not 0.
    if (Math.abs(k.im) > 1e-9 * Math.abs(kr)) continue;
    if (Math.sign(kr) !== sgn) continue;
    out.push({ s, gain: kr, branches: cl.multiplicity + 1 });
  }
  return out.sort((a, b) => Math.abs(a.gain) - Math.abs(b.gain) || a.s.re - b.s.re || a.s.im - b.s.im);
}

/** Real and imaginary parts of p(jω) as real polynomials in ω. */
function splitJw(p: readonly number[]): { re: number[]; im: number[] } {
  const re: number[] = [];
  const im: number[] = [];
  for (let i = 0; i < p.length; i++) {
    const sign = (i >> 1) % 2 === 0 ? 1 : -1; // j^i = 1, j, −1, −j
    re.push(i % 2 === 0 ? sign * p[i] : 0);
    im.push(i % 2 === 1 ? sign * p[i] : 0);
  }
  return { re: P.trim(re), im: P.trim(im) };
}

/**
 * jω-axis crossings: D(jω) + k·N(jω) = 0 with real k ⇔ Im(D·conj N) = Di·Nr − Dr·Ni = 0.
 * That polynomial is odd in ω, so it is solved in x = ω² (degree ≤ MAX_ORDER); k then
 * follows exactly as −Re(D·conj N)/|N|². ω = 0 is a crossing when D(0) + k·N(0) = 0.
 */
function findCrossings(N: number[], D: number[], sgn: number): RootLocus['crossings'] {
  const out: RootLocus['crossings'] = [];
  const n0 = N[0] ?? 0;
  const d0 = D[0] ?? 0;
  if (n0 !== 0 && d0 !== 0 && Math.sign(-d0 / n0) === sgn) out.push({ omega: 0, gain: -d0 / n0 });
  const dj = splitJw(D);
  const nj = splitJw(N);
  const Q = P.sub(P.mul(dj.im, nj.re), P.mul(dj.re, nj.im));
  if (Q.length < 2) return out; // identically zero (the locus runs along the axis) or constant
  // Q(ω) = ω·Q2(ω²).
  const Q2: number[] = [];
  for (let i = 1; i < Q.length; i += 2) Q2.push(Q[i]);
  const q2 = P.trim(Q2);
  if (q2.length < 2) return out;
  const xs = clusterRoots(rootsAnyDegree(q2)).map((c) => c.center);
  const seen: number[] = [];
  for (const x of xs) {
    if (x.im !== 0 || x.re <= 0) continue;
    let w = Math.sqrt(x.re);
    w = polishReal(Q, w);
    if (seen.some((v) => Math.abs(v - w) <= 1e-9 * (1 + w))) continue;
    const s = cx(0, w);
    const nv = P.evalComplex(N, s);
    const dv = P.evalComplex(D, s);
    if (cabs(nv) <= 1e-10 * polyMagnitude(N, s)) continue; // a zero on the axis (k = ∞)
    if (cabs(dv) <= 1e-10 * polyMagnitude(D, s)) continue; // a pole on the axis (k = 0)
    const k = -(dv.re * nv.re + dv.im * nv.im) / (nv.re * nv.re + nv.im * nv.im);
    if (Math.sign(k) !== sgn) continue;
    seen.push(w);
    out.push({ omega: w, gain: k });
  }
  return out.sort((a, b) => Math.abs(a.gain) - Math.abs(b.gain) || a.omega - b.omega);
}

function polishReal(p: readonly number[], x0: number): number {
  const d = P.derivative(p);
  let x = x0;
  let fx = Math.abs(P.evalReal(p, x));
  for (let i = 0; i < 8 && fx > 0; i++) {
    const dp = P.evalReal(d, x);
    if (dp === 0) break;
    const nx = x - P.evalReal(p, x) / dp;
    const fn = Math.abs(P.evalReal(p, nx));
    if (!(fn < fx)) break;
    x = nx;
    fx = fn;
  }
  return x;
}

/** Real-axis parts: intervals between real poles/zeros where −D(σ)/N(σ) has the locus's sign. */
function realSegments(N: number[], D: number[], sgn: number, poles: Complex[], zeros: Complex[]): RootLocus['realAxisSegments'] {
  const pts = [...new Set([...poles, ...zeros].filter((r) => r.im === 0).map((r) => r.re))].sort((a, b) => a - b);
  const edges = [-Infinity, ...pts, Infinity];
  const onLocus: boolean[] = [];
  for (let i = 0; i + 1 < edges.length; i++) {
    const a = edges[i];
    const b = edges[i + 1];
    let mid: number;
    if (a === -Infinity && b === Infinity) mid = 0;
    else if (a === -Infinity) mid = b - 1 - Math.abs(b);
    else if (b === Infinity) mid = a + 1 + Math.abs(a);
    else mid = 0.5 * (a + b);
    const k = -P.evalReal(D, mid) / P.evalReal(N, mid);
    onLocus.push(Number.isFinite(k) && Math.sign(k) === sgn);
  }
  const out: RootLocus['realAxisSegments'] = [];
  for (let i = 0; i < onLocus.length; i++) {
    if (!onLocus[i]) continue;
    const from = edges[i];
    let j = i;
    while (j + 1 < onLocus.length && onLocus[j + 1]) j++;
    out.push({ from, to: edges[j + 1] });
    i = j;
  }
  return out;
}

function autoKMax(N: number[], D: number[], n: number, m: number, R: number, zeros: Cluster[], special: number[]): number {
  let k = 0;
  for (const g of special) k = Math.max(k, 10 * g);
  // Asymptotic branches reach |s| ≈ 10·R: |k·lead N| ≈ |lead D|·|s|^(n−m).
  if (n > m) k = Math.max(k, Math.abs(P.lead(D) / P.lead(N)) * (10 * R) ** (n - m));
  // Branches ending at zeros come within 1 % of R of them.
  for (const z of zeros) {
    const s = cx(z.center.re + 0.01 * R, z.center.im);
    const v = cabs(cdiv(P.evalComplex(D, s), P.evalComplex(N, s)));
    if (Number.isFinite(v)) k = Math.max(k, v);
  }
  // n = m: the leading coefficient of D + kN vanishes at k* = −lead D/lead N; go well past it.
  if (n === m) k = Math.max(k, 100 * Math.abs(P.lead(D) / P.lead(N)));
  if (!(k > 0) || !Number.isFinite(k)) k = 1;
  return k;
}

/** Roots of any degree up to 2·MAX_ORDER (breakaway polynomials can exceed MAX_ORDER): balanced companion eigenvalues + Newton. */
function rootsAnyDegree(p: number[]): Complex[] {
  const c = P.trim(p);
  if (c.length - 1 <= MAX_ORDER) return polyRoots(c);
  let lowZeros = 0;
  while (c[lowZeros] === 0) lowZeros++;
  const q = c.slice(lowZeros);
  const deg = q.length - 1;
  const a: number[][] = [];
  for (let i = 0; i < deg; i++) a.push(new Array<number>(deg).fill(0));
  for (let j = 0; j < deg; j++) a[0][j] = -q[deg - 1 - j] / q[deg];
  for (let i = 1; i < deg; i++) a[i][i - 1] = 1;
  const eig = matrixEigenvalues(a, 'companion matrix of the breakaway polynomial', true, true);
  const d = P.derivative(q);
  const out: Complex[] = new Array<Complex>(lowZeros).fill(cx(0));
  eig.forEach((z0) => {
    let z = z0;
    for (let it = 0; it < 4; it++) {
      const dz = cdiv(P.evalComplex(q, z), P.evalComplex(d, z));
      if (!Number.isFinite(dz.re) || !Number.isFinite(dz.im)) break;
      z = cx(z.re - dz.re, z.im - dz.im);
    }
    out.push(Math.abs(z.im) <= 1e-12 * (1 + cabs(z)) ? cx(z.re) : z);
  });
  return out;
}

// ————————————————————————————————————————————————————————————— tracing

/**
 * Traces the n closed-loop poles over the gain range. Each new gain is solved by a warm-started
 * simultaneous Newton (Aberth–Ehrlich) iteration from the previous roots, which keeps each root's
 * identity; when it does not converge, roots collide or the set is not conjugate-symmetric, the
 * roots come from `polyRoots` and are matched to the previous ones (nearest-first assignment).
 * A gain step is halved until every root moves at most fraction·(|s| + scale). Breakaway and
 * crossing gains are members of the gain list, and their roots are snapped to the exact points.
 */
class Tracer {
  private readonly n: number;
  private readonly re: Float64Array;
  private readonly im: Float64Array;
  private readonly done: Uint8Array;
  constructor(
    private readonly N: number[],
    private readonly D: number[],
    private readonly sgn: number,
    private readonly fraction: number,
    private readonly scale: number,
    private readonly breakaways: RootLocus['breakaways'],
    private readonly crossings: RootLocus['crossings'],
  ) {
    this.n = D.length - 1;
    this.re = new Float64Array(this.n);
    this.im = new Float64Array(this.n);
    this.done = new Uint8Array(this.n);
  }

  trace(kMin: number, kMax: number, samples: number, poles: Complex[]): { branches: LocusPoint[][]; gains: number[]; kStar: number } {
    const n = this.n;
    if (n === 0) return { branches: [], gains: [], kStar: NaN };
    const sgn = this.sgn;
    // Base magnitudes: geometric from kMax·1e−7 (or kMin) to kMax, plus 0 and the special gains.
    const lo = kMin > 0 ? kMin : kMax * 1e-7;
    const mags: number[] = [];
    if (kMin === 0) mags.push(0);
    const count = kMin === 0 ? samples - 1 : samples;
    for (let i = 0; i < count; i++) mags.push(count === 1 ? kMax : lo * (kMax / lo) ** (i / (count - 1)));
    const specialMags = new Set<number>();
    for (const b of this.breakaways) if (Math.abs(b.gain) >= kMin && Math.abs(b.gain) <= kMax) specialMags.add(Math.abs(b.gain));
    for (const x of this.crossings) if (Math.abs(x.gain) >= kMin && Math.abs(x.gain) <= kMax) specialMags.add(Math.abs(x.gain));
    // n = m: the degree drops at k*; the gains step over a small gap around it.
    let kStar = NaN;
    if (this.N.length === this.D.length) {
      const ks = -P.lead(this.D) / P.lead(this.N);
      if (Math.sign(ks) === sgn && Math.abs(ks) > kMin && Math.abs(ks) < kMax) kStar = Math.abs(ks);
    }
    let all = [...mags, ...specialMags].sort((a, b) => a - b);
    // Drop base gains that are within a relative 1e−9 of a special one (keep the special, exact one).
    all = all.filter((k, i) => {
      if (specialMags.has(k)) return i === 0 || all[i - 1] !== k;
      for (const s of specialMags) if (Math.abs(k - s) <= 1e-9 * s) return false;
      return i === 0 || all[i - 1] !== k;
    });
    const gap = 1e-3;
    if (Number.isFinite(kStar)) {
      all = all.filter((k) => Math.abs(k - kStar) > gap * kStar);
      all.push(kStar * (1 - gap), kStar * (1 + gap));
      all.sort((a, b) => a - b);
    }

    const tracks: LocusPoint[][] = [];
    for (let i = 0; i < n; i++) tracks.push([]);
    const gains: number[] = [];
    let cur: Complex[];
    const k0 = sgn * all[0];
    if (all[0] === 0) cur = poles.slice();
    else cur = this.snap(k0, polyRoots(this.charPoly(k0)));
    const push = (k: number, roots: Complex[]) => {
      gains.push(k);
      for (let i = 0; i < n; i++) tracks[i].push({ s: roots[i], k });
    };
    push(k0, cur);
    const pieces: LocusPoint[][] = [];
    let kPrev = all[0];
    for (let idx = 1; idx < all.length; idx++) {
      const kNext = all[idx];
      if (Number.isFinite(kStar) && kPrev < kStar && kNext > kStar) {
        // Across the degree drop one root passes through infinity: close the tracks and start new ones.
        for (const t of tracks) pieces.push(t.splice(0));
        const k1 = sgn * kNext;
        cur = this.snap(k1, polyRoots(this.charPoly(k1)));
        push(k1, cur);
        kPrev = kNext;
        continue;
      }
      cur = this.advance(kPrev, cur, kNext, specialMags.has(kNext), push);
      kPrev = kNext;
    }
    pieces.push(...tracks);
    return { branches: joinPieces(pieces, this.fraction, this.scale), gains, kStar };
  }

  /** Steps from |k| = ka (roots ra) to kb, halving the step until the continuity bound holds. */
  private advance(ka: number, ra: Complex[], kb: number, exact: boolean, push: (k: number, r: Complex[]) => void): Complex[] {
    const stack: { k: number; exact: boolean }[] = [{ k: kb, exact }];
    let kCur = ka;
    let rCur = ra;
    while (stack.length) {
      const target = stack[stack.length - 1];
      const kSigned = this.sgn * target.k;
      const r = (target.exact && this.exactRoots(kSigned, rCur)) || (target.exact ? this.snap(kSigned, this.solve(kSigned, rCur)) : this.solve(kSigned, rCur));
      const tooSmall = target.k - kCur <= 1e-13 * Math.max(target.k, 1e-300);
      if (tooSmall || this.withinBound(rCur, r)) {
        push(kSigned, r);
        stack.pop();
        kCur = target.k;
        rCur = r;
      } else {
        stack.push({ k: 0.5 * (kCur + target.k), exact: false });
      }
    }
    return rCur;
  }

  private withinBound(a: Complex[], b: Complex[]): boolean {
    for (let i = 0; i < a.length; i++) {
      const lim = this.fraction * (cabs(a[i]) + this.scale);
      if (Math.hypot(a[i].re - b[i].re, a[i].im - b[i].im) > lim) return false;
    }
    return true;
  }

  charPoly(k: number): number[] {
    const out = this.D.slice();
    for (let i = 0; i < this.N.length; i++) out[i] += k * this.N[i];
    return out;
  }

  /** Roots of D + kN ordered to follow `prev`. */
  private solve(k: number, prev: Complex[]): Complex[] {
    const p = this.charPoly(k);
    const fast = this.aberth(p, prev);
    if (fast) return fast;
    return matchRoots(prev, polyRoots(p));
  }

  /** Warm-started Aberth–Ehrlich iteration; null when it fails (then eigenvalues are used). */
  private aberth(p: number[], prev: Complex[]): Complex[] | null {
    const n = this.n;
    const re = this.re;
    const im = this.im;
    for (let i = 0; i < n; i++) {
      re[i] = prev[i].re;
      im[i] = prev[i].im;
    }
    // Coincident starting roots (a snapped breakaway, a repeated pole) would divide by zero:
    // split them slightly, as a conjugate-symmetric pair off the real axis when they are real.
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        if (re[i] !== re[j] || im[i] !== im[j]) continue;
        const d = 1e-7 * (Math.hypot(re[i], im[i]) + this.scale);
        if (im[i] === 0) {
          im[i] = d;
          im[j] = -d;
        } else {
          re[i] += d;
          re[j] -= d;
        }
      }
    }
    const done = this.done;
    done.fill(0);
    let converged = false;
    for (let it = 0; it < 30 && !converged; it++) {
      converged = true;
      for (let i = 0; i < n; i++) {
        if (done[i]) continue; // converged roots stay put (they still repel the others)
        const zr = re[i];
        const zi = im[i];
        const za = Math.hypot(zr, zi);
        // Horner for p and p' together, and Σ|p_j|·|z|^j for the rounding level of p(z).
        let pr = p[n];
        let pi = 0;
        let dr = 0;
        let di = 0;
        let ab = Math.abs(p[n]);
        for (let j = n - 1; j >= 0; j--) {
          const ndr = dr * zr - di * zi + pr;
          di = dr * zi + di * zr + pi;
          dr = ndr;
          const npr = pr * zr - pi * zi + p[j];
          pi = pr * zi + pi * zr;
          pr = npr;
          ab = ab * za + Math.abs(p[j]);
        }
        if (pr === 0 && pi === 0) {
          done[i] = 1;
          continue;
        }
        // At the rounding level of p(z) no further step can improve z (backward-stable root).
        const atRounding = Math.hypot(pr, pi) <= 32 * Number.EPSILON * ab;
        if (dr === 0 && di === 0) return null;
        // ratio = p/p' by Smith's method (no squares: high orders at large gains overflow them)
        let qr: number;
        let qi: number;
        if (Math.abs(dr) >= Math.abs(di)) {
          const t = di / dr;
          const den = dr + di * t;
          qr = (pr + pi * t) / den;
          qi = (pi - pr * t) / den;
        } else {
          const t = dr / di;
          const den = dr * t + di;
          qr = (pr * t + pi) / den;
          qi = (pi * t - pr) / den;
        }
        let sr = 0;
        let si = 0;
        for (let j = 0; j < n; j++) {
          if (j === i) continue;
          const ur = zr - re[j];
          const ui = zi - im[j];
          const uu = ur * ur + ui * ui;
          if (uu === 0) return null; // collision
          sr += ur / uu;
          si -= ui / uu;
        }
        // w = ratio / (1 − ratio·sum)
        const br = 1 - (qr * sr - qi * si);
        const bi = -(qr * si + qi * sr);
        const bb = br * br + bi * bi;
        if (bb === 0) return null;
        const wr = (qr * br + qi * bi) / bb;
        const wi = (qi * br - qr * bi) / bb;
        re[i] = zr - wr;
        im[i] = zi - wi;
        if (!atRounding && Math.hypot(wr, wi) > 1e-12 * (za + this.scale)) converged = false;
        else done[i] = 1;
      }
    }
    if (!converged) return null;
    for (let i = 0; i < n; i++) if (!Number.isFinite(re[i]) || !Number.isFinite(im[i])) return null;
    return symmetrizeInPlace(re, im, this.scale);
  }

  /**
   * At a special gain the special points are known roots (a breakaway with its multiplicity,
   * ±jω of a crossing): divide them out of D + kN and solve only the rest, so the special points
   * are exact members and the others are not spoilt by the ill-conditioned multiple root.
   * Null when the division leaves a remainder (then `snap` is used).
   */
  private exactRoots(k: number, prev: Complex[]): Complex[] | null {
    const rel = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));
    const known: Complex[] = [];
    for (const b of this.breakaways) if (rel(b.gain, k)) for (let i = 0; i < b.branches; i++) known.push(b.s);
    for (const x of this.crossings) {
      if (!rel(x.gain, k)) continue;
      known.push(cx(0, x.omega));
      if (x.omega > 0) known.push(cx(0, -x.omega));
    }
    if (known.length === 0 || known.length > this.n) return null;
    const p = this.charPoly(k);
    const { q, r } = P.divmod(p, P.fromRoots(known));
    const size = p.reduce((m, c) => Math.max(m, Math.abs(c)), 0);
    if (r.some((c) => Math.abs(c) > 1e-7 * size)) return null;
    const rest = q.length > 1 ? polyRoots(q) : [];
    if (known.length + rest.length !== this.n) return null;
    return matchRoots(prev, [...known, ...rest]);
  }

  /** At a special gain, moves the roots nearest each special point exactly onto it. */
  private snap(k: number, roots: Complex[]): Complex[] {
    const out = roots.slice();
    const rel = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));
    const taken = new Set<number>();
    const place = (target: Complex, count: number) => {
      const order = out
        .map((z, i) => ({ i, d: Math.hypot(z.re - target.re, z.im - target.im) }))
        .filter((e) => !taken.has(e.i))
        .sort((a, b) => a.d - b.d);
      for (const e of order.slice(0, count)) {
        if (e.d > 1e-3 * (cabs(target) + this.scale)) break; // not a root here: leave it
        out[e.i] = target;
        taken.add(e.i);
      }
    };
    for (const b of this.breakaways) if (rel(b.gain, k)) place(b.s, b.branches);
    for (const x of this.crossings) {
      if (!rel(x.gain, k)) continue;
      place(cx(0, x.omega), 1);
      if (x.omega > 0) place(cx(0, -x.omega), 1);
    }
    return out;
  }
}

/** Exact conjugate symmetry: near-real roots become real, complex roots pair with their partners; null if a root has none. */
function symmetrizeInPlace(re: Float64Array, im: Float64Array, scale: number): Complex[] | null {
  const n = re.length;
  const out: Complex[] = new Array<Complex>(n);
  const paired = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    if (paired[i]) continue;
    const size = Math.hypot(re[i], im[i]) + scale;
    if (Math.abs(im[i]) <= 1e-10 * size) {
      out[i] = cx(re[i]);
      paired[i] = 1;
      continue;
    }
    let best = -1;
    let bestD = Infinity;
    for (let j = 0; j < n; j++) {
      if (j === i || paired[j]) continue;
      const d = Math.hypot(re[i] - re[j], im[i] + im[j]);
      if (d < bestD) {
        bestD = d;
        best = j;
      }
    }
    if (best < 0 || bestD > 1e-7 * size) return null;
    const r = 0.5 * (re[i] + re[best]);
    const m = 0.5 * (im[i] - im[best]);
    out[i] = cx(r, m);
    out[best] = cx(r, -m);
    paired[i] = 1;
    paired[best] = 1;
  }
  return out;
}

/** Orders `next` to follow `prev`: globally nearest pairs first (a greedy assignment). */
function matchRoots(prev: Complex[], next: Complex[]): Complex[] {
  const n = prev.length;
  if (next.length !== n) throw new Error(`root count changed from ${n} to ${next.length}`);
  const pairs: { i: number; j: number; d: number }[] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) pairs.push({ i, j, d: Math.hypot(prev[i].re - next[j].re, prev[i].im - next[j].im) });
  }
  pairs.sort((a, b) => a.d - b.d);
  const out = new Array<Complex>(n);
  const usedI = new Uint8Array(n);
  const usedJ = new Uint8Array(n);
  let left = n;
  for (const p of pairs) {
    if (usedI[p.i] || usedJ[p.j]) continue;
    out[p.i] = next[p.j];
    usedI[p.i] = 1;
    usedJ[p.j] = 1;
    if (--left === 0) break;
  }
  return out;
}

/** Joins pieces split at a degree drop: a later piece continues an earlier one that ends where it starts. */
function joinPieces(pieces: LocusPoint[][], fraction: number, scale: number): LocusPoint[][] {
  const out: LocusPoint[][] = [];
  const nonEmpty = pieces.filter((p) => p.length > 0);
  const firstGain = nonEmpty.length ? Math.abs(nonEmpty[0][0].k) : 0;
  const heads = nonEmpty.filter((p) => Math.abs(p[0].k) === firstGain);
  const rest = nonEmpty.filter((p) => Math.abs(p[0].k) !== firstGain);
  out.push(...heads);
  for (const piece of rest) {
    const start = piece[0].s;
    let best: LocusPoint[] | null = null;
    let bestD = Infinity;
    for (const o of out) {
      const end = o[o.length - 1];
      if (Math.abs(end.k) >= Math.abs(piece[0].k)) continue;
      const d = Math.hypot(end.s.re - start.re, end.s.im - start.im);
      if (d < bestD) {
        bestD = d;
        best = o;
      }
    }
    if (best && bestD <= fraction * (cabs(start) + scale)) best.push(...piece);
    else out.push(piece);
  }
  return out;
}
