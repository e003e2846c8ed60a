import { type Complex, cabs, cdiv, cx } from './complex.ts';
import { InputError, MAX_ORDER, assertFinite } from './errors.ts';
import * as P from './poly.ts';
import { factorPoly, rootsOfFactored } from './pencil.ts';
import { anglesOf, asymptotesOf, autoKMax, findBreakaways, findCrossings, realSegments } from './locus-geometry.ts';
import { traceLocus } from './locus-trace.ts';

/**
 * Root locus of the characteristic equation 1 + k·N(s)/D(s) = 0, i.e. the roots of
 * D(s) + k·N(s), for k > 0 (default) or k < 0 (`negative`). Rules: Ogata, Sec. 6-2; Nise,
 * Ch. 8 (from memory). Gains are signed (k < 0 on the negative locus) and refer to N and D
 * exactly as given (no normalisation), so `gainAtPoint` = −D(s)/N(s) matches the trace.
 * The geometry lives in locus-geometry.ts, the traced branches in locus-trace.ts; both work
 * on N and D in product form (pencil.ts), which keeps orders up to 60 correct.
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
  /** How far the numbers can be trusted; `limited` when some traced pole is good to fewer than six digits. */
  accuracy: LocusAccuracy;
}

export interface LocusAccuracy {
  /** Worst estimated relative error of a traced closed-loop pole. */
  worstRelativeError: number;
  /** Worst estimated relative error of an open-loop pole or zero (how well N and D fix them). */
  openLoopRelativeError: number;
  limited: boolean;
  /** Gain steps where the solver stopped at its iteration cap (its best iterate was used). */
  unconverged: number;
  /** The continuity refinement stopped at its point cap: branches may jump between points. */
  truncated: boolean;
  /** Plain statement for the CLI and the editor; empty when nothing is limited. */
  note: string;
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
  /** Deadline on the performance.now() clock (ms): past it the trace stops with a BudgetError('time'). */
  deadline?: number;
  /** Most traced gains (default 4000): past it the continuity refinement stops and `accuracy.truncated` says so. */
  maxPoints?: number;
}

/** Six digits: below this a pole is reported as of limited accuracy. */
const ACCURACY_LIMIT = 1e-6;

export function rootLocus(num: P.Poly, den: P.Poly, opts: RootLocusOptions = {}): RootLocus {
  const N = checkPoly(num, 'numerator N(s)');
  const D = checkPoly(den, 'denominator D(s)');
  if (N.length === 0) throw new InputError('numerator N(s) is zero: 1 + k·N/D = 0 has no gain to sweep', { field: 'numerator' });
  const n = D.length - 1;
  const m = N.length - 1;
  if (m > n) {
    throw new InputError(`improper loop: numerator degree ${m} is above denominator degree ${n} (k·N/D must be proper)`, {
      field: 'numerator',
    });
  }
  const negative = opts.negative === true;
  const sgn = negative ? -1 : 1;
  const fraction = opts.stepFraction ?? 0.05;
  if (!(fraction > 0 && fraction < 1)) throw new InputError(`stepFraction must lie in (0, 1), got ${fraction}`, { field: 'stepFraction' });
  const kMin = opts.kMin ?? 0;
  if (!Number.isFinite(kMin) || kMin < 0) {
    throw new InputError(`kMin must be a finite gain magnitude ≥ 0 (use negative: true for the k < 0 locus), got ${kMin}`, {
      field: 'kMin',
    });
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

  const Df = factorPoly(D);
  const Nf = factorPoly(N);
  // A leading coefficient so small against the others (1e-320·s² + s + 3) that a root lies
  // beyond the floating-point range: no branch can be drawn towards it.
  for (const [f, what] of [
    [Df, 'denominator D(s)'],
    [Nf, 'numerator N(s)'],
  ] as const) {
    if (!Number.isFinite(f.lead) || f.factors.some((x) => !Number.isFinite(x.root.re) || !Number.isFinite(x.root.im))) {
      throw new InputError(
        `${what}: a root lies beyond the floating-point range (|s| > 1e308; its leading coefficient is negligible against the others): drop that term`,
        {
          field: what.startsWith('numerator') ? 'numerator' : 'denominator',
        },
      );
    }
  }
  const poles = rootsOfFactored(Df);
  const zeros = rootsOfFactored(Nf);
  const asymptotes = asymptotesOf(N, D, sgn);
  const breakaways = findBreakaways(N, D, Nf, Df, sgn);
  const crossings = findCrossings(N, D, Nf, Df, sgn);
  const realAxisSegments = realSegments(Nf, Df, sgn);
  const { departures, arrivals } = anglesOf(N, D, Nf, Df, sgn);

  // Scale for the continuity bound: median size of the finite features (1 if there are none).
  const sizes = [...poles, ...zeros, ...breakaways.map((b) => b.s)]
    .map(cabs)
    .concat(crossings.map((x) => x.omega))
    .filter((x) => x > 0);
  sizes.sort((a, b) => a - b);
  const scale = sizes.length ? sizes[Math.floor(sizes.length / 2)] : 1;
  const R = sizes.length ? sizes[sizes.length - 1] : 1;

  const special = [...breakaways.map((b) => Math.abs(b.gain)), ...crossings.map((x) => Math.abs(x.gain))];
  const kMax = opts.kMax ?? autoKMax(Nf, Df, R, special);
  if (kMax <= kMin) throw new InputError(`k range reversed: kMin ${kMin} is not below kMax ${kMax}`, { field: 'kMin' });

  const t = traceLocus(N, D, Nf, Df, sgn, kMin, kMax, samples, fraction, scale, breakaways, crossings, {
    ...(opts.deadline !== undefined ? { deadline: opts.deadline } : {}),
    ...(opts.maxPoints !== undefined ? { maxPoints: opts.maxPoints } : {}),
  });
  const openLoop = Math.max(relativeErrorOf(Df), relativeErrorOf(Nf));
  const limited = t.worstRelativeError > ACCURACY_LIMIT || openLoop > ACCURACY_LIMIT || t.unconverged > 0 || t.truncated;
  const parts: string[] = [];
  if (openLoop > ACCURACY_LIMIT)
    parts.push(`the coefficients fix the open-loop poles and zeros only to about ${fmtRel(openLoop)} (relative)`);
  if (t.worstRelativeError > ACCURACY_LIMIT) parts.push(`traced poles are good to about ${fmtRel(t.worstRelativeError)} (relative)`);
  if (t.unconverged > 0) parts.push(`at ${t.unconverged} gain step(s) the pole solver stopped at its iteration cap`);
  if (t.truncated) parts.push(`the trace stopped refining at ${t.gains.length} gains, so a branch may jump between points`);

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
    branches: t.branches,
    gains: t.gains,
    kRange: [sgn * kMin, sgn * kMax],
    stepBound: { fraction, scale },
    degreeDropGain: Number.isFinite(t.kStar) ? sgn * t.kStar : null,
    accuracy: {
      worstRelativeError: t.worstRelativeError,
      openLoopRelativeError: openLoop,
      limited,
      unconverged: t.unconverged,
      truncated: t.truncated,
      note: limited ? `accuracy limited: ${parts.join('; ')}` : '',
    },
  };
}

const fmtRel = (x: number) => (!Number.isFinite(x) ? 'no digit' : x >= 0.01 ? `${Math.round(x * 100)} %` : x.toExponential(0));

function relativeErrorOf(f: ReturnType<typeof factorPoly>): number {
  let scale = 0;
  for (const g of f.factors) scale = Math.max(scale, cabs(g.root));
  let worst = 0;
  for (const g of f.factors) worst = Math.max(worst, g.error / Math.max(cabs(g.root), 1e-8 * scale, Number.MIN_VALUE));
  return worst;
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

function checkPoly(p: P.Poly, what: string): number[] {
  assertFinite(p, what);
  const t = P.trim(p);
  if (t.length - 1 > MAX_ORDER) throw new InputError(`${what}: order ${t.length - 1} is above the limit of ${MAX_ORDER}`, { field: what });
  return t;
}
