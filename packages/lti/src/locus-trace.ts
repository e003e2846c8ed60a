import { type Complex, cabs, cx } from './complex.ts';
import { BudgetError } from './errors.ts';
import { deadlineTicker } from './budget.ts';
import { type FactoredPoly, PencilSolver, type PencilRoots, reconcileWithCoefficients, rootsOfFactored } from './pencil.ts';
import { matchRoots } from './root-match.ts';
import type { LocusPoint, RootLocus } from './locus.ts';

/**
 * Tracing the n closed-loop poles of D + k·N over the gain range. Each new gain is solved by
 * the product-form Aberth iteration (pencil.ts) warm-started from the previous roots, which
 * keeps each root's identity; when it does not converge the roots are solved afresh and
 * matched to the previous ones (root-match.ts). A gain step is halved until every root moves at
 * most fraction·(|s| + scale). Breakaway and crossing gains are members of the gain list, with
 * their roots snapped onto the exact points. Leaving a repeated pole (k = 0 with coincident
 * roots) the start comes from the local expansion (s − p)^μ ≈ −k·N(p)/D̃(p), which puts the μ
 * branches on their departure directions at once.
 */
/** Unconverged pole solutions after which the trace stops refining (each one costs a full iteration cap). */
const UNCONVERGED_LIMIT = 64;

export interface TraceOptions {
  deadline?: number;
  /** Most traced gains before the continuity refinement stops (default 4000: ten times the base samples). */
  maxPoints?: number;
}

export interface TraceResult {
  branches: LocusPoint[][];
  gains: number[];
  /** n = m degree-drop gain magnitude, NaN when not in range. */
  kStar: number;
  /** Worst estimated relative error of a traced pole. */
  worstRelativeError: number;
  /** Gain steps where the solver did not meet its stopping test (the result is its best iterate). */
  unconverged: number;
  /** True when maxPoints stopped the continuity refinement. */
  truncated: boolean;
}

export function traceLocus(
  N: readonly number[],
  D: readonly number[],
  Nf: FactoredPoly,
  Df: FactoredPoly,
  sgn: number,
  kMin: number,
  kMax: number,
  samples: number,
  fraction: number,
  scale: number,
  breakaways: RootLocus['breakaways'],
  crossings: RootLocus['crossings'],
  opts: TraceOptions = {},
): TraceResult {
  const n = Df.degree;
  const empty = { branches: [], gains: [], kStar: NaN, worstRelativeError: 0, unconverged: 0, truncated: false };
  if (n === 0) return empty;
  const ticker = deadlineTicker(opts.deadline, 'root locus', 8);
  // How well the coefficients fix the open-loop roots (relative): the floor of the step halving.
  let noise = 0;
  for (const f of [...Df.factors, ...Nf.factors]) {
    const a = cabs(f.root);
    if (a > 0 && Number.isFinite(f.error)) noise = Math.max(noise, f.error / a);
  }
  const maxPoints = opts.maxPoints ?? 4000;
  let worstRel = 0;
  let unconverged = 0;
  let truncated = false;

  // Base magnitudes: geometric from kMax·1e−7 (or kMin) to kMax, plus 0 and the special gains.
  const lo = kMin > 0 ? kMin : kMax * 1e-7;
  const mags: number[] = [];
  if (kMin === 0) mags.push(0);
  const count = kMin === 0 ? samples - 1 : samples;
  for (let i = 0; i < count; i++) mags.push(count === 1 ? kMax : lo * (kMax / lo) ** (i / (count - 1)));
  const specialMags = new Set<number>();
  for (const b of breakaways) if (Math.abs(b.gain) >= kMin && Math.abs(b.gain) <= kMax) specialMags.add(Math.abs(b.gain));
  for (const x of crossings) if (Math.abs(x.gain) >= kMin && Math.abs(x.gain) <= kMax) specialMags.add(Math.abs(x.gain));
  // n = m: the degree drops at k*; the gains step over a small gap around it.
  let kStar = NaN;
  if (Nf.degree === Df.degree) {
    const ks = -Df.lead / Nf.lead;
    if (Math.sign(ks) === sgn && Math.abs(ks) > kMin && Math.abs(ks) < kMax) kStar = Math.abs(ks);
  }
  // Leaving k = 0: around a μ-fold pole p the roots move as |k·N(p)/D̃(p)|^(1/μ); the first
  // traced gain is the one that keeps that within the continuity bound (no halving from the
  // first base gain, which lies 1e-7·kMax away and may be 1e30 times too large).
  if (kMin === 0) {
    let first = Infinity;
    for (const f of Df.factors) {
      const w = firstGain(Nf, Df, f.root, f.multiplicity, 0.5 * fraction * (cabs(f.root) + scale));
      if (w > 0 && w < first) first = w;
    }
    if (Number.isFinite(first) && first < lo) mags.push(first);
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

  const rel = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));
  /** At a special gain, moves the roots nearest each special point exactly onto it. */
  const snap = (k: number, roots: Complex[]): Complex[] => {
    const out = roots.slice();
    const taken = new Set<number>();
    const place = (target: Complex, cnt: number) => {
      const order = out
        .map((z, i) => ({ i, d: Math.hypot(z.re - target.re, z.im - target.im) }))
        .filter((e) => !taken.has(e.i))
        .sort((a, b) => a.d - b.d);
      for (const e of order.slice(0, cnt)) {
        if (e.d > 1e-3 * (cabs(target) + scale)) break; // not a root here: leave it
        out[e.i] = target;
        taken.add(e.i);
      }
    };
    for (const b of breakaways) if (rel(b.gain, k)) place(b.s, b.branches);
    for (const x of crossings) {
      if (!rel(x.gain, k)) continue;
      place(cx(0, x.omega), 1);
      if (x.omega > 0) place(cx(0, -x.omega), 1);
    }
    return out;
  };
  const solver = new PencilSolver(Df, Nf);
  /** D + kN in coefficients. */
  const charPoly = (k: number): number[] => {
    const out = D.slice();
    for (let i = 0; i < N.length; i++) out[i] += k * N[i];
    return out;
  };
  // Leaving k = 0 from a repeated pole, the warm start is replaced by the local expansion.
  const poles0 = rootsOfFactored(Df);
  const coincident0 = Df.factors.some((f) => f.multiplicity > 1);
  /** Roots of D + kN following `prev` (same count). */
  // The last two accepted points, for a linear prediction of the next roots (a warm start
  // with a second-order error saves the Aberth iteration a sweep or two).
  let back: { k: number; roots: Complex[] } | null = null;
  let front: { k: number; roots: Complex[] } | null = null;
  const accept = (k: number, roots: Complex[]) => {
    back = front;
    front = { k, roots };
  };
  const predict = (k: number, prev: Complex[]): Complex[] | null => {
    const f = front as { k: number; roots: Complex[] } | null;
    const b = back as { k: number; roots: Complex[] } | null;
    if (!f || !b || f.roots !== prev || f.k === b.k) return null;
    const t = (k - f.k) / (f.k - b.k);
    if (!(t > 0 && t <= 2)) return null;
    return prev.map((z, i) => cx(z.re + t * (z.re - b.roots[i].re), z.im + t * (z.im - b.roots[i].im)));
  };
  const solve = (k: number, prev: Complex[] | null): { roots: Complex[]; errors: number[] } => {
    ticker.tick();
    let r: PencilRoots | null = null;
    if (prev) {
      const guess = prev === poles0 && coincident0 ? solver.expansionStarts(k) : predict(k, prev);
      if (guess && guess.length === n) r = solver.solve(k, { start: guess, maxIterations: 12 });
      if (!r?.converged) {
        const warm = solver.solve(k, { start: prev });
        if (!r || warm.converged || worstOf(warm) < worstOf(r)) r = warm;
      }
    }
    if (!r?.converged) {
      const fresh = solver.solve(k);
      if (!r || fresh.converged || worstOf(fresh) < worstOf(r)) r = fresh;
    }
    if (r.roots.length !== n) throw new BudgetError(`root locus: the solver returned ${r.roots.length} of ${n} poles at k = ${k}`, 'steps');
    if (!r.converged) unconverged++;
    reconcileWithCoefficients(charPoly(k), r.roots, r.errors);
    if (!prev || r.followsStart) return { roots: r.roots, errors: r.errors };
    const perm = matchRoots(prev, r.roots);
    return { roots: perm.map((j) => r.roots[j]), errors: perm.map((j) => r.errors[j]) };
  };
  /** The roots at a gain; at a special gain snapped onto the exact points (whose error is then 0). */
  const rootsAt = (k: number, prev: Complex[] | null, exact: boolean): Complex[] => {
    const got = solve(k, prev);
    const roots = exact ? snap(k, got.roots) : got.roots;
    roots.forEach((z, i) => {
      if (z !== got.roots[i]) return; // snapped: exact
      const e = got.errors[i];
      if (Number.isFinite(e)) worstRel = Math.max(worstRel, e / Math.max(cabs(z), 1e-8 * scale));
      else worstRel = Infinity;
    });
    return roots;
  };

  const tracks: LocusPoint[][] = [];
  for (let i = 0; i < n; i++) tracks.push([]);
  const gains: number[] = [];
  const k0 = sgn * all[0];
  let cur = all[0] === 0 ? poles0 : rootsAt(k0, null, true);
  const push = (k: number, roots: Complex[]) => {
    accept(k, roots);
    gains.push(k);
    for (let i = 0; i < n; i++) tracks[i].push({ s: roots[i], k });
  };
  push(k0, cur);
  const within = (a: Complex[], b: Complex[]) => {
    for (let i = 0; i < a.length; i++) {
      if (Math.hypot(a[i].re - b[i].re, a[i].im - b[i].im) > fraction * (cabs(a[i]) + scale)) return false;
    }
    return true;
  };
  /** Steps from |k| = ka (roots ra) to kb, halving the step until the continuity bound holds. */
  const advance = (ka: number, ra: Complex[], kb: number, exact: boolean): Complex[] => {
    const stack: { k: number; exact: boolean }[] = [{ k: kb, exact }];
    let kCur = ka;
    let rCur = ra;
    while (stack.length) {
      const target = stack[stack.length - 1];
      const kSigned = sgn * target.k;
      const r = rootsAt(kSigned, rCur, target.exact);
      // Halving stops at rounding, or sooner when the open-loop roots themselves are uncertain:
      // then the roots' own noise breaks the bound and no smaller step can restore it.
      const tooSmall = target.k - kCur <= Math.max(1e-13, Math.min(0.1, noise)) * Math.max(target.k, 1e-300);
      // Refinement stops at the point cap, or once the solver has failed to converge often: past
      // that every further halving costs a full iteration cap and buys no accuracy (a 1e308 gain
      // against unit-size poles). The accuracy note says so.
      if (gains.length >= maxPoints || unconverged > UNCONVERGED_LIMIT) truncated = true;
      if (tooSmall || truncated || within(rCur, r)) {
        push(kSigned, r);
        stack.pop();
        kCur = target.k;
        rCur = r;
      } else {
        // Halve the step: arithmetically, or geometrically across a wide gain ratio (from 1e-7·kMax
        // towards kMax a plain midpoint would take a hundred halvings to come back down).
        const mid = kCur > 0 && target.k > 4 * kCur ? Math.sqrt(kCur * target.k) : 0.5 * (kCur + target.k);
        stack.push({ k: mid, exact: false });
      }
    }
    return rCur;
  };
  const pieces: LocusPoint[][] = [];
  let kPrev = all[0];
  for (let idx = 1; idx < all.length; idx++) {
    const kNext = all[idx];
    if (Number.isFinite(kStar) && kPrev < kStar && kNext > kStar) {
      // Across the degree drop one root passes through infinity: close the tracks and start new ones.
      for (const t of tracks) pieces.push(t.splice(0));
      back = front = null;
      const k1 = sgn * kNext;
      cur = rootsAt(k1, null, true);
      push(k1, cur);
      kPrev = kNext;
      continue;
    }
    cur = advance(kPrev, cur, kNext, specialMags.has(kNext));
    kPrev = kNext;
  }
  pieces.push(...tracks);
  return { branches: joinPieces(pieces, fraction, scale), gains, kStar, worstRelativeError: worstRel, unconverged, truncated };
}

/** The gain k at which roots leaving the μ-fold pole p have moved `dist`: |k·N(p)/D̃(p)|·… = dist^μ. */
function firstGain(Nf: FactoredPoly, Df: FactoredPoly, p: Complex, mu: number, dist: number): number {
  // log |N(p)/D̃(p)| with D̃ = D/(s − p)^μ, from the factors.
  let log = Math.log(Math.abs(Nf.lead / Df.lead));
  for (const g of Nf.factors) {
    const d = Math.hypot(p.re - g.root.re, p.im - g.root.im);
    if (d === 0) return 0;
    log += g.multiplicity * Math.log(d);
  }
  for (const g of Df.factors) {
    if (g.root.re === p.re && g.root.im === p.im) continue;
    log -= g.multiplicity * Math.log(Math.hypot(p.re - g.root.re, p.im - g.root.im));
  }
  const k = Math.exp(mu * Math.log(dist) - log);
  return Number.isFinite(k) ? k : 0;
}

const worstOf = (r: PencilRoots) => r.errors.reduce((m, e) => Math.max(m, Number.isFinite(e) ? e : Infinity), 0);

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
