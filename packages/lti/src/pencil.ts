import { type Complex, cabs, cx } from './complex.ts';
import * as P from './poly.ts';
import { polyRootsDetailed } from './roots.ts';
import { companionEigenvalues } from './companion.ts';
import { conjugateSymmetric } from './root-match.ts';

/**
 * Roots of A(s) + k·B(s) with A and B held in product form, lead·Π(s − r)^m: the closed-loop
 * poles of 1 + k·B/A (a root locus at gain k, a loop with its Padé factors). Working with the
 * factors instead of the expanded coefficients is what keeps high orders correct: the
 * coefficients of (s + 1)^40 + 4 span eleven decades and fix its roots only to ±0.5, while in
 * product form every root is found to ~1e-15. It also never forms coefficients that overflow
 * (a dead time of 1e308 s next to a 1 s lag).
 *
 * The solver is the Aberth–Ehrlich simultaneous iteration (Aberth, Math. Comp. 27 (1973);
 * Ehrlich, Comm. ACM 10 (1967) (from memory)), warm-started from given roots (locus tracing)
 * or from a local expansion around A's roots. The Newton ratio f/f′ is formed from
 * R = k·B/A and the logarithmic derivatives σ_A = Σ m/(s − a), σ_B = Σ m/(s − b):
 *   f/f′ = (1 + R)/(σ_A + R·σ_B),
 * with R kept as mantissa × 2^e so that no product overflows.
 */
export interface FactoredPoly {
  readonly lead: number;
  /** Distinct roots with their multiplicity and estimated absolute error. */
  readonly factors: readonly { readonly root: Complex; readonly multiplicity: number; readonly error: number }[];
  readonly degree: number;
}

/** A polynomial in product form: roots by polyRootsDetailed (repeated roots at their exact centres). */
export function factorPoly(p: P.Poly, maxDegree?: number): FactoredPoly {
  const t = P.trim(p);
  const lead = t[t.length - 1] ?? 0;
  if (t.length <= 1) return { lead, factors: [], degree: 0 };
  const d = polyRootsDetailed(t, maxDegree !== undefined ? { maxDegree } : {});
  return factoredFromRoots(d.roots, lead, d.errors);
}

/** Product form from roots (equal roots are merged into one factor with a multiplicity). */
export function factoredFromRoots(roots: readonly Complex[], lead = 1, errors?: readonly number[]): FactoredPoly {
  const factors: { root: Complex; multiplicity: number; error: number }[] = [];
  roots.forEach((r, i) => {
    const hit = factors.find((f) => f.root.re === r.re && f.root.im === r.im);
    if (hit) hit.multiplicity++;
    else factors.push({ root: r, multiplicity: 1, error: errors?.[i] ?? 0 });
  });
  return { lead, factors, degree: roots.length };
}

/** The product a·b in product form. */
export function factoredProduct(a: FactoredPoly, b: FactoredPoly): FactoredPoly {
  const out = factoredFromRoots([], a.lead * b.lead);
  const factors = a.factors.map((f) => ({ ...f }));
  for (const f of b.factors) {
    const hit = factors.find((g) => g.root.re === f.root.re && g.root.im === f.root.im);
    if (hit) hit.multiplicity += f.multiplicity;
    else factors.push({ ...f });
  }
  return { ...out, factors, degree: a.degree + b.degree };
}

/** All roots of a product form, each repeated by its multiplicity. */
export function rootsOfFactored(f: FactoredPoly): Complex[] {
  const out: Complex[] = [];
  for (const g of f.factors) for (let i = 0; i < g.multiplicity; i++) out.push(g.root);
  return out;
}

/** The expanded ascending coefficients (may overflow for extreme root ranges: check finiteness). */
export function expandFactored(f: FactoredPoly): number[] {
  return P.fromRoots(rootsOfFactored(f), f.lead);
}

export interface PencilOptions {
  /** Starting roots (warm start); their count must equal the degree of A + kB. */
  start?: readonly Complex[];
  /** Iteration cap (default 60). */
  maxIterations?: number;
  /** Absolute floor added to |s| in relative tests (default: pencilFloor(A, B)). */
  floor?: number;
}

export interface PencilRoots {
  roots: Complex[];
  /** Estimated absolute error of each root: rounding in product form plus the errors of A's and B's roots. */
  errors: number[];
  /** Every root met the stopping test and the set is conjugate-symmetric. */
  converged: boolean;
  /** roots[i] continues opts.start[i] (the warm start was used and converged). */
  followsStart?: boolean;
}

const EPS = 2.220446049250313e-16;
const TWO400 = 2 ** 400;
const TWOM400 = 2 ** -400;

/** Degree of A + k·B (the leading terms may cancel exactly). */
export function pencilDegree(A: FactoredPoly, B: FactoredPoly, k: number): number {
  if (k === 0 || B.lead === 0) return A.degree;
  if (B.degree > A.degree) return B.degree;
  if (B.degree < A.degree) return A.degree;
  if (A.lead + k * B.lead !== 0) return A.degree;
  return A.degree - 1; // (the next coefficient decides further; a root count drop by one is what a locus meets)
}

/**
 * The absolute floor of the relative tests: 1e-6 × the smallest nonzero root of A and B. Tests
 * are relative to each root's own size (a loop may hold a 1e-300 and a 1 rad/s root at once).
 */
export function pencilFloor(A: FactoredPoly, B: FactoredPoly): number {
  let m = Infinity;
  for (const f of [...A.factors, ...B.factors]) {
    const a = cabs(f.root);
    if (a > 0) m = Math.min(m, a);
  }
  return Number.isFinite(m) ? 1e-6 * m : 1e-6;
}

/** (a + jb)/(c + jd) by Smith's method. */
function cdivParts(a: number, b: number, c: number, d: number): Complex {
  if (Math.abs(c) >= Math.abs(d)) {
    const r = d / c;
    const den = c + d * r;
    return cx((a + b * r) / den, (b - a * r) / den);
  }
  const r = c / d;
  const den = c * r + d;
  return cx((a * r + b) / den, (b * r - a) / den);
}

/** Starting points: around each root a of A, the local expansion (s − a)^m ≈ −k·B(a)/Ã(a). */
function expansionStarts(A: FactoredPoly, B: FactoredPoly, c0: [number, number], n: number, floor: number): Complex[] {
  const out: Complex[] = [];
  const k = c0[0];
  for (const f of A.factors) {
    const a = f.root;
    // w = −c0·Π(a − b)^m / Π_(other factors)(a − a')^m' as log-magnitude and angle
    let logw = Math.log(Math.abs(c0[0])) + c0[1] * Math.LN2;
    let ang = c0[0] < 0 ? 0 : Math.PI;
    let hit = false;
    for (const g of B.factors) {
      const d = cx(a.re - g.root.re, a.im - g.root.im);
      const m = cabs(d);
      if (m === 0) hit = true;
      else {
        logw += g.multiplicity * Math.log(m);
        ang += g.multiplicity * Math.atan2(d.im, d.re);
      }
    }
    for (const g of A.factors) {
      if (g === f) continue;
      const d = cx(a.re - g.root.re, a.im - g.root.im);
      logw -= g.multiplicity * Math.log(cabs(d));
      ang -= g.multiplicity * Math.atan2(d.im, d.re);
    }
    const mu = f.multiplicity;
    let r = hit || k === 0 ? 0 : Math.exp(logw / mu);
    const least = 1e-7 * (cabs(a) + floor);
    if (!(r > least)) r = least;
    if (!Number.isFinite(r)) r = 10 * (cabs(a) + floor);
    for (let q = 0; q < mu; q++) {
      const t = (ang + 2 * Math.PI * q) / mu;
      out.push(cx(a.re + r * Math.cos(t), a.im + r * Math.sin(t)));
    }
  }
  // Roots beyond A's count (B of higher degree): on a wide circle.
  const R = 10 * (floor + Math.max(0, ...out.map(cabs)));
  for (let q = out.length; q < n; q++) {
    const t = (2 * Math.PI * (q + 0.25)) / Math.max(1, n - out.length);
    out.push(cx(R * Math.cos(t), R * Math.sin(t)));
  }
  return out.slice(0, n);
}

/** Starting points from the expanded coefficients (companion eigenvalues), when they are finite. */
function companionStarts(A: FactoredPoly, B: FactoredPoly, k: number, n: number): Complex[] | null {
  try {
    const c = P.add(expandFactored(A), P.scale(expandFactored(B), k));
    if (c.length - 1 !== n || !c.every(Number.isFinite)) return null;
    const z = companionEigenvalues(c, 'closed-loop characteristic polynomial');
    return z.length === n && z.every((w) => Number.isFinite(w.re) && Number.isFinite(w.im)) ? z : null;
  } catch {
    return null;
  }
}

/**
 * Time scaling for root sets far from unit size (a 1e308 s dead time gives Padé roots near
 * 1e-308, whose differences and products underflow): s = τ·x with τ a power of two (exact),
 * chosen so that the roots' log-sizes are centred on 1. Returns τ = 1 when no scaling is needed.
 */
function timeScale(A: FactoredPoly, B: FactoredPoly): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (const f of [...A.factors, ...B.factors]) {
    const a = cabs(f.root);
    if (!(a > 0)) continue;
    const l = Math.log2(a);
    lo = Math.min(lo, l);
    hi = Math.max(hi, l);
  }
  if (!Number.isFinite(lo)) return 1;
  const mid = Math.round((lo + hi) / 2);
  return Math.abs(mid) > 60 || lo < -900 || hi > 900 ? 2 ** mid : 1;
}

const scaleFactored = (f: FactoredPoly, tau: number): FactoredPoly => ({
  lead: f.lead,
  degree: f.degree,
  factors: f.factors.map((g) => ({ root: cx(g.root.re / tau, g.root.im / tau), multiplicity: g.multiplicity, error: g.error / tau })),
});

/** k·lead_B/lead_A·τ^(deg B − deg A) as mantissa × 2^exp. */
function pencilConstant(A: FactoredPoly, B: FactoredPoly, k: number, tau: number): [number, number] {
  const c = (k * B.lead) / A.lead;
  const e = Math.round(Math.log2(tau)) * (B.degree - A.degree);
  return [c, e];
}

/**
 * A solver for the roots of A + k·B at many gains (a locus trace). Roots that A and B share
 * exactly (an integrator in both, s² over s²·…) are roots of A + k·B at every gain: they are set
 * aside and returned as they are, since at such a root 1 + k·B/A does not vanish and the
 * iteration would creep towards it linearly without ever meeting its stopping test.
 */
export class PencilSolver {
  private readonly core: ReducedPencil;
  /** The shared roots, each repeated by its multiplicity, with their error estimates. */
  private readonly fixed: { root: Complex; error: number }[] = [];

  constructor(
    readonly A: FactoredPoly,
    readonly B: FactoredPoly,
  ) {
    const aLeft = A.factors.map((f) => ({ ...f }));
    const bLeft = B.factors.map((f) => ({ ...f }));
    for (const f of aLeft) {
      const g = bLeft.find((h) => h.root.re === f.root.re && h.root.im === f.root.im);
      if (!g) continue;
      const m = Math.min(f.multiplicity, g.multiplicity);
      for (let i = 0; i < m; i++) this.fixed.push({ root: f.root, error: Math.max(f.error, g.error) });
      f.multiplicity -= m;
      g.multiplicity -= m;
    }
    const m = this.fixed.length;
    const reduced = (f: FactoredPoly, left: typeof aLeft): FactoredPoly =>
      m === 0 ? f : { lead: f.lead, degree: f.degree - m, factors: left.filter((g) => g.multiplicity > 0) };
    this.core = new ReducedPencil(reduced(A, aLeft), reduced(B, bLeft));
  }

  /** Roots of A + k·B (see pencilRoots). */
  solve(k: number, opts: PencilOptions = {}): PencilRoots {
    const m = this.fixed.length;
    if (m === 0) return this.core.solve(k, opts);
    const n = pencilDegree(this.A, this.B, k);
    // A warm start: the start points nearest the shared roots stand for them; the others start the rest.
    let rest: readonly Complex[] | undefined;
    let slots: number[] | null = null;
    if (opts.start && opts.start.length === n) {
      const taken = new Uint8Array(n);
      slots = [];
      for (const f of this.fixed) {
        let best = -1;
        let bestD = Infinity;
        for (let i = 0; i < n; i++) {
          if (taken[i]) continue;
          const d = Math.hypot(opts.start[i].re - f.root.re, opts.start[i].im - f.root.im);
          if (d < bestD) {
            bestD = d;
            best = i;
          }
        }
        taken[best] = 1;
        slots.push(best);
      }
      rest = opts.start.filter((_, i) => !taken[i]);
    }
    const { start: _start, ...others } = opts;
    const got = this.core.solve(k, rest ? { ...others, start: rest } : others);
    if (!slots) {
      return {
        ...got,
        roots: [...got.roots, ...this.fixed.map((f) => f.root)],
        errors: [...got.errors, ...this.fixed.map((f) => f.error)],
      };
    }
    // In the start's order: roots[i] continues start[i].
    const roots = new Array<Complex>(n);
    const errors = new Array<number>(n);
    slots.forEach((i, q) => {
      roots[i] = this.fixed[q].root;
      errors[i] = this.fixed[q].error;
    });
    let q = 0;
    for (let i = 0; i < n; i++) {
      if (roots[i]) continue;
      roots[i] = got.roots[q];
      errors[i] = got.errors[q++];
    }
    return { ...got, roots, errors };
  }

  /** Start points for A + k·B from the local expansion around A's roots (the shared roots as they are). */
  expansionStarts(k: number): Complex[] {
    return [...this.core.expansionStarts(k), ...this.fixed.map((f) => f.root)];
  }
}

/**
 * The solver proper, for A and B without shared roots: A and B are packed into flat arrays once,
 * with their time scale, and the work buffers are reused from gain to gain.
 */
class ReducedPencil {
  private readonly tau: number;
  private readonly As: FactoredPoly;
  private readonly Bs: FactoredPoly;
  private readonly aRe: Float64Array;
  private readonly aIm: Float64Array;
  private readonly aMul: Int32Array;
  private readonly aErr: Float64Array;
  private readonly bRe: Float64Array;
  private readonly bIm: Float64Array;
  private readonly bMul: Int32Array;
  private readonly bErr: Float64Array;
  private readonly floor: number;
  private readonly nTerms: number;
  private re = new Float64Array(0);
  private im = new Float64Array(0);
  private err = new Float64Array(0);
  private done = new Uint8Array(0);
  // The evaluation's outputs (fields instead of an object: no allocation in the hot loop).
  private nr = 0;
  private ni = 0;
  private atRounding = false;
  private error = Infinity;
  private bad = false;

  constructor(
    readonly A: FactoredPoly,
    readonly B: FactoredPoly,
  ) {
    this.tau = timeScale(A, B);
    this.As = this.tau === 1 ? A : scaleFactored(A, this.tau);
    this.Bs = this.tau === 1 ? B : scaleFactored(B, this.tau);
    const pack = (f: FactoredPoly) => ({
      re: Float64Array.from(f.factors, (g) => g.root.re),
      im: Float64Array.from(f.factors, (g) => g.root.im),
      mul: Int32Array.from(f.factors, (g) => g.multiplicity),
      err: Float64Array.from(f.factors, (g) => g.error),
    });
    const a = pack(this.As);
    const b = pack(this.Bs);
    this.aRe = a.re;
    this.aIm = a.im;
    this.aMul = a.mul;
    this.aErr = a.err;
    this.bRe = b.re;
    this.bIm = b.im;
    this.bMul = b.mul;
    this.bErr = b.err;
    this.floor = pencilFloor(this.As, this.Bs);
    this.nTerms = A.degree + B.degree + 2;
  }

  /** Roots of A + k·B (see pencilRoots). */
  solve(k: number, opts: PencilOptions = {}): PencilRoots {
    const A = this.A;
    const n = pencilDegree(A, this.B, k);
    if (n === 0) return { roots: [], errors: [], converged: true };
    if (k === 0)
      return {
        roots: rootsOfFactored(A),
        errors: A.factors.flatMap((f) => new Array<number>(f.multiplicity).fill(f.error)),
        converged: true,
      };
    const tau = this.tau;
    const c0 = pencilConstant(A, this.B, k, tau);
    const floor = opts.floor !== undefined ? opts.floor / tau : this.floor;
    const maxIt = opts.maxIterations ?? 60;
    const scaleIn = (zs: readonly Complex[]) => (tau === 1 ? zs : zs.map((z) => cx(z.re / tau, z.im / tau)));
    let last: PencilRoots | null = null;
    for (let t = 0; t < 3; t++) {
      let start: readonly Complex[] | null;
      if (t === 0) start = opts.start && opts.start.length === n ? scaleIn(opts.start) : null;
      else if (t === 1) start = c0[1] === 0 ? companionStarts(this.As, this.Bs, k, n) : null;
      else start = expansionStarts(this.As, this.Bs, c0, n, floor);
      if (!start) continue;
      const got = this.aberth(c0, start, maxIt, floor);
      if (got.converged) {
        if (t === 0) got.followsStart = true;
        return tau === 1
          ? got
          : { ...got, roots: got.roots.map((z) => cx(z.re * tau, z.im * tau)), errors: got.errors.map((e) => e * tau) };
      }
      if (!last || worst(got) < worst(last)) last = got;
    }
    const r = last!;
    return tau === 1 ? r : { ...r, roots: r.roots.map((z) => cx(z.re * tau, z.im * tau)), errors: r.errors.map((e) => e * tau) };
  }

  /** Start points for A + k·B from the local expansion around A's roots. */
  expansionStarts(k: number): Complex[] {
    const n = pencilDegree(this.A, this.B, k);
    const got = expansionStarts(this.As, this.Bs, pencilConstant(this.A, this.B, k, this.tau), n, this.floor);
    return this.tau === 1 ? got : got.map((z) => cx(z.re * this.tau, z.im * this.tau));
  }

  /** f/f′ at z for f = A + kB (k·lead_B/lead_A = c0·2^e0), into the output fields. */
  private evaluate(zr: number, zi: number, c0: number, e0: number): void {
    let sar = 0;
    let sai = 0;
    let sbr = 0;
    let sbi = 0;
    let rr = c0;
    let ri = 0;
    let e2 = e0;
    let errA = 0;
    let errB = 0;
    const na = this.aRe.length;
    for (let q = 0; q < na; q++) {
      const dr = zr - this.aRe[q];
      const di = zi - this.aIm[q];
      if (dr === 0 && di === 0) {
        this.bad = true;
        return;
      }
      // 1/d: one division where |d| is moderate, Smith's method (no squares) otherwise
      let ir: number;
      let ii: number;
      const ad = Math.abs(dr) + Math.abs(di);
      if (ad > 1e-150 && ad < 1e150) {
        const dd = dr * dr + di * di;
        ir = dr / dd;
        ii = -di / dd;
      } else if (Math.abs(dr) >= Math.abs(di)) {
        const t = di / dr;
        const den = dr + di * t;
        ir = 1 / den;
        ii = -t / den;
      } else {
        const t = dr / di;
        const den = dr * t + di;
        ir = t / den;
        ii = -1 / den;
      }
      const m = this.aMul[q];
      sar += m * ir;
      sai += m * ii;
      const ea = this.aErr[q];
      if (ea !== 0) errA += m * ea * (Math.abs(ir) + Math.abs(ii));
      for (let j = 0; j < m; j++) {
        const nr = rr * ir - ri * ii;
        ri = rr * ii + ri * ir;
        rr = nr;
        const mag = Math.abs(rr) + Math.abs(ri);
        if (mag > TWO400 || (mag < TWOM400 && mag > 0)) {
          const ex = Math.round(Math.log2(mag));
          const f = 2 ** -ex;
          rr *= f;
          ri *= f;
          e2 += ex;
        }
      }
    }
    const nb = this.bRe.length;
    for (let q = 0; q < nb; q++) {
      const dr = zr - this.bRe[q];
      const di = zi - this.bIm[q];
      if (dr === 0 && di === 0) {
        this.bad = true;
        return;
      }
      let ir: number;
      let ii: number;
      const ad = Math.abs(dr) + Math.abs(di);
      if (ad > 1e-150 && ad < 1e150) {
        const dd = dr * dr + di * di;
        ir = dr / dd;
        ii = -di / dd;
      } else if (Math.abs(dr) >= Math.abs(di)) {
        const t = di / dr;
        const den = dr + di * t;
        ir = 1 / den;
        ii = -t / den;
      } else {
        const t = dr / di;
        const den = dr * t + di;
        ir = t / den;
        ii = -1 / den;
      }
      const m = this.bMul[q];
      sbr += m * ir;
      sbi += m * ii;
      const eb = this.bErr[q];
      if (eb !== 0) errB += m * eb * (Math.abs(ir) + Math.abs(ii));
      for (let j = 0; j < m; j++) {
        const nr = rr * dr - ri * di;
        ri = rr * di + ri * dr;
        rr = nr;
        const mag = Math.abs(rr) + Math.abs(ri);
        if (mag > TWO400 || (mag < TWOM400 && mag > 0)) {
          const ex = Math.round(Math.log2(mag));
          const f = 2 ** -ex;
          rr *= f;
          ri *= f;
          e2 += ex;
        }
      }
    }
    const log2R = e2 === 0 ? Math.log2(Math.abs(rr) + Math.abs(ri)) : Math.log2(Math.abs(rr) + Math.abs(ri)) + e2;
    let numR: number;
    let numI: number;
    let denR: number;
    let denI: number;
    // `rounding`: the evaluation's own rounding level (the stopping test); `err` adds the
    // uncertainty of A's and B's roots (the error estimate of the root reached).
    let rounding: number;
    let err: number;
    if (!(log2R > 0)) {
      // |R| ≤ ~1: f/f′ = (1 + R)/(σA + R·σB)
      const sc = e2 === 0 ? 1 : log2R < -1000 ? 0 : 2 ** e2;
      const Rr = rr * sc;
      const Ri = ri * sc;
      const aR = Math.abs(Rr) + Math.abs(Ri);
      numR = 1 + Rr;
      numI = Ri;
      denR = sar + Rr * sbr - Ri * sbi;
      denI = sai + Rr * sbi + Ri * sbr;
      rounding = EPS * this.nTerms * (1 + aR);
      err = rounding + errA + aR * errB;
    } else {
      // |R| > 1: f/f′ = (1/R + 1)/(σA/R + σB)
      const sc = e2 === 0 ? 1 : log2R > 1000 ? 0 : 2 ** -e2;
      const m2 = rr * rr + ri * ri;
      const Ir = sc === 0 ? 0 : (rr / m2) * sc;
      const Ii = sc === 0 ? 0 : (-ri / m2) * sc;
      const aI = Math.abs(Ir) + Math.abs(Ii);
      numR = 1 + Ir;
      numI = Ii;
      denR = sbr + Ir * sar - Ii * sai;
      denI = sbi + Ir * sai + Ii * sar;
      rounding = EPS * this.nTerms * (1 + aI);
      err = rounding + errB + aI * errA;
    }
    const nm = Math.hypot(numR, numI);
    const dm = Math.hypot(denR, denI);
    if (!(dm > 0) || !Number.isFinite(dm)) {
      this.nr = 0;
      this.ni = 0;
      this.atRounding = nm <= rounding;
      this.error = Infinity;
      this.bad = !(nm <= rounding);
      return;
    }
    if (Math.abs(denR) >= Math.abs(denI)) {
      const r = denI / denR;
      const d = denR + denI * r;
      this.nr = (numR + numI * r) / d;
      this.ni = (numI - numR * r) / d;
    } else {
      const r = denR / denI;
      const d = denR * r + denI;
      this.nr = (numR * r + numI) / d;
      this.ni = (numI * r - numR) / d;
    }
    this.atRounding = nm <= 4 * rounding;
    this.error = err / dm;
    this.bad = !Number.isFinite(nm);
  }

  /** The Aberth–Ehrlich iteration (Gauss–Seidel order) from `start`, in scaled time. */
  private aberth(c0: [number, number], start: readonly Complex[], maxIt: number, floor: number): PencilRoots {
    const n = start.length;
    if (this.re.length !== n) {
      this.re = new Float64Array(n);
      this.im = new Float64Array(n);
      this.err = new Float64Array(n);
      this.done = new Uint8Array(n);
    }
    const { re, im, err, done } = this;
    for (let i = 0; i < n; i++) {
      re[i] = start[i].re;
      im[i] = start[i].im;
    }
    // Coincident starts (a snapped breakaway, a repeated pole) would divide by zero: spread them.
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        if (re[i] !== re[j] || im[i] !== im[j]) continue;
        const d = 1e-7 * (Math.hypot(re[i], im[i]) + floor);
        const t = (2 * Math.PI * (j - i)) / n + 0.3;
        re[j] += d * Math.cos(t);
        im[j] += d * Math.sin(t);
      }
    }
    done.fill(0);
    err.fill(Infinity);
    let left = n;
    for (let it = 0; it < maxIt && left > 0; it++) {
      for (let i = 0; i < n; i++) {
        if (done[i]) continue;
        this.bad = false;
        this.evaluate(re[i], im[i], c0[0], c0[1]);
        if (this.bad) {
          // On a root of A or B exactly: step off it a little.
          const d = 1e-12 * (Math.hypot(re[i], im[i]) + floor);
          re[i] += d;
          im[i] += d * 0.5;
          this.bad = false;
          this.evaluate(re[i], im[i], c0[0], c0[1]);
          if (this.bad) continue;
        }
        err[i] = this.error;
        // Done on the backward-error test, or (below) after a tiny Newton step that no neighbour
        // dominates: a tiny step alone is not convergence, since two approximations collapsing
        // onto one point also make the Aberth correction tiny.
        if (this.atRounding) {
          done[i] = 1;
          left--;
          continue;
        }
        let sr = 0;
        let si = 0;
        for (let j = 0; j < n; j++) {
          if (j === i) continue;
          const ur = re[i] - re[j];
          const ui = im[i] - im[j];
          if (ur === 0 && ui === 0) continue;
          if (Math.abs(ur) >= Math.abs(ui)) {
            const t = ui / ur;
            const den = ur + ui * t;
            sr += 1 / den;
            si -= t / den;
          } else {
            const t = ur / ui;
            const den = ur * t + ui;
            sr += t / den;
            si -= 1 / den;
          }
        }
        // w = N/(1 − N·S)
        const vr = this.nr;
        const vi = this.ni;
        const br = 1 - (vr * sr - vi * si);
        const bi = -(vr * si + vi * sr);
        let wr = vr;
        let wi = vi;
        if (br !== 0 || bi !== 0) {
          if (Math.abs(br) >= Math.abs(bi)) {
            const r = bi / br;
            const d = br + bi * r;
            wr = (vr + vi * r) / d;
            wi = (vi - vr * r) / d;
          } else {
            const r = br / bi;
            const d = br * r + bi;
            wr = (vr * r + vi) / d;
            wi = (vi * r - vr) / d;
          }
        }
        if (!Number.isFinite(wr) || !Number.isFinite(wi)) continue;
        re[i] -= wr;
        im[i] -= wi;
        // A Newton step this small, not dominated by the other approximations (|N·S| small, so
        // no collapse onto a neighbour), leaves an error far below rounding (cubic convergence).
        const ns = Math.abs(vr * sr - vi * si) + Math.abs(vr * si + vi * sr);
        if (ns < 0.1 && Math.abs(wr) + Math.abs(wi) <= 1e-10 * (Math.abs(re[i]) + Math.abs(im[i]) + floor)) {
          done[i] = 1;
          left--;
        }
      }
    }
    // (err[i] is the estimate at the last evaluation: at the root itself, or one step before it.)
    const raw: Complex[] = new Array<Complex>(n);
    let finite = true;
    for (let i = 0; i < n; i++) {
      raw[i] = cx(re[i], im[i]);
      if (!Number.isFinite(re[i]) || !Number.isFinite(im[i])) finite = false;
    }
    const tol = Float64Array.from(err, (e) => 4 * e);
    const sym = conjugateSymmetric(raw, floor, 1e-10, 1e-7, tol);
    return { roots: sym ?? raw, errors: Array.from(err), converged: left === 0 && sym !== null && finite };
  }
}

/** Roots of A + k·B by the Aberth–Ehrlich iteration in product form (see above). */
export function pencilRoots(A: FactoredPoly, B: FactoredPoly, k: number, opts: PencilOptions = {}): PencilRoots {
  return new PencilSolver(A, B).solve(k, opts);
}

const worst = (r: PencilRoots) => r.errors.reduce((m, e) => Math.max(m, Number.isFinite(e) ? e : Infinity), 0);

/**
 * Roots of A + k·B when no warm start is at hand and a direct solve may not converge: by
 * continuation from k = 0 (A's roots) in geometric gain steps, each warm-started from the last.
 */
export function pencilRootsContinued(A: FactoredPoly, B: FactoredPoly, k: number, steps = 24): PencilRoots {
  const solver = new PencilSolver(A, B);
  const direct = solver.solve(k);
  if (direct.converged) return direct;
  let prev: PencilRoots | null = null;
  const k0 = k * 1e-8;
  for (let i = 0; i <= steps; i++) {
    const ki = k0 * (k / k0) ** (i / steps);
    const n = pencilDegree(A, B, ki);
    prev = solver.solve(ki, { maxIterations: 80, ...(prev && prev.roots.length === n ? { start: prev.roots } : {}) });
  }
  return prev && (prev.converged || worst(prev) < worst(direct)) ? prev : direct;
}

/**
 * a(s)/b(s) for polynomials in product form, as one complex number: factors are interleaved
 * with a running power-of-two scale, so the result over- or underflows only when the true
 * value lies outside the double range. (b = 1 when omitted: the value a(s).)
 */
export function factoredRatio(a: FactoredPoly, b: FactoredPoly | null, s: Complex): Complex {
  let rr = b ? a.lead / b.lead : a.lead;
  let ri = 0;
  let e2 = 0;
  const norm = () => {
    const mag = Math.abs(rr) + Math.abs(ri);
    if (mag > TWO400) {
      rr *= TWOM400;
      ri *= TWOM400;
      e2 += 400;
    } else if (mag < TWOM400 && mag > 0) {
      rr *= TWO400;
      ri *= TWO400;
      e2 -= 400;
    }
  };
  for (const f of a.factors) {
    const dr = s.re - f.root.re;
    const di = s.im - f.root.im;
    for (let j = 0; j < f.multiplicity; j++) {
      const nr = rr * dr - ri * di;
      ri = rr * di + ri * dr;
      rr = nr;
      norm();
    }
  }
  if (b) {
    for (const f of b.factors) {
      const inv = cdivParts(1, 0, s.re - f.root.re, s.im - f.root.im);
      for (let j = 0; j < f.multiplicity; j++) {
        const nr = rr * inv.re - ri * inv.im;
        ri = rr * inv.im + ri * inv.re;
        rr = nr;
        norm();
      }
    }
  }
  if (e2 === 0) return cx(rr, ri);
  // Apply 2^e2 in two halves (each within range when the result is).
  const h = Math.trunc(e2 / 2);
  const f1 = 2 ** h;
  const f2 = 2 ** (e2 - h);
  return cx(rr * f1 * f2, ri * f1 * f2);
}

/** Logarithmic derivative p′/p = Σ m/(s − r) of a product form. */
export function factoredLogDerivative(f: FactoredPoly, s: Complex): Complex {
  let re = 0;
  let im = 0;
  for (const g of f.factors) {
    const inv = cdivParts(1, 0, s.re - g.root.re, s.im - g.root.im);
    re += g.multiplicity * inv.re;
    im += g.multiplicity * inv.im;
  }
  return cx(re, im);
}

/** Start points for A + k·B from the local expansion around A's roots (see pencilRoots). */
export function pencilExpansionStarts(A: FactoredPoly, B: FactoredPoly, k: number): Complex[] {
  return new PencilSolver(A, B).expansionStarts(k);
}

/**
 * Reconciles product-form roots with the expanded coefficients c they stand for: a Newton step
 * on c is taken where it lowers |c(z)| and moves z by no more than twice the root's estimated
 * error (the open-loop roots behind the product form are themselves only that accurate). Low
 * orders thus end backward-stable in the coefficients; where the coefficients are too
 * ill-conditioned to help ((s + 1)^40), the bound keeps them from pulling a root off.
 */
export function reconcileWithCoefficients(c: readonly number[], roots: Complex[], errors: readonly number[]): void {
  const n = c.length - 1;
  if (n < 1) return;
  for (let i = 0; i < roots.length; i++) {
    const e = errors[i];
    if (!(e > 0) || !Number.isFinite(e)) continue;
    let z = roots[i];
    for (let step = 0; step < 2; step++) {
      // Horner for c(z) and c′(z)
      let pr = c[n];
      let pi = 0;
      let dr = 0;
      let di = 0;
      for (let k = n - 1; k >= 0; k--) {
        const ndr = dr * z.re - di * z.im + pr;
        di = dr * z.im + di * z.re + pi;
        dr = ndr;
        const npr = pr * z.re - pi * z.im + c[k];
        pi = pr * z.im + pi * z.re;
        pr = npr;
      }
      if (pr === 0 && pi === 0) break;
      if (dr === 0 && di === 0) break;
      const d = cdivParts(pr, pi, dr, di);
      if (!(Math.hypot(d.re, d.im) <= 2 * e)) break;
      const next = cx(z.re - d.re, z.im === 0 ? 0 : z.im - d.im);
      const v = P.evalComplex(c, next);
      if (!(Math.hypot(v.re, v.im) < Math.hypot(pr, pi))) break;
      z = next;
    }
    roots[i] = z;
  }
}
