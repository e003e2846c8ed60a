import {
  type Complex,
  InputError,
  type RootLocus,
  cabs,
  cancelCommon,
  checkDeadline,
  csub,
  matchRoots,
  poly,
  polyRoots,
  rational,
  rootLocus,
} from '@loopwright/lti';
import type { Diagram, Sweep } from '../document-types.ts';
import type { ParameterOverrides } from '../resolve.ts';
import { type DelayHandling, type ReduceOptions, characteristicPolynomial } from './reduce.ts';

/**
 * A sweep of one named parameter over the whole diagram (all other parameters fixed).
 * - exact: the characteristic polynomial is affine in the parameter, P(k) = D0 + k·N0, so the
 *   exact root-locus geometry of 1 + k·N0/D0 = 0 applies to the whole multi-loop system;
 * - sampled: any other parameter, roots at sampled values joined into continuous branches.
 */
export type SweepLocus =
  | {
      mode: 'exact';
      parameter: string;
      value: number;
      /** Locus of 1 + k·N/D with the factors common to N0 and D0 removed (see fixedPoles). */
      locus: RootLocus;
      /** The full split: closed-loop poles at k are the roots of d0 + k·n0 (ascending). */
      n0: number[];
      d0: number[];
      /** Closed-loop poles that do not move with the parameter (common roots of N0 and D0, e.g. a mode no loop through it sees). */
      fixedPoles: Complex[];
      delayHandling: DelayHandling;
    }
  | {
      mode: 'sampled';
      parameter: string;
      value: number;
      values: number[];
      branches: { s: Complex; k: number }[][];
      reason: string;
      delayHandling: DelayHandling;
    };

export interface SweepOptions extends ReduceOptions {
  /** Locus for k < 0 (exact mode). */
  negative?: boolean;
  /** Largest gain traced (exact mode); default: far enough for the whole geometry. */
  kMax?: number;
  /** Samples of a sampled locus (default 60; refined where roots move fast). */
  samples?: number;
}

/** Relative size of the affinity residual accepted as round-off. */
const AFFINE_TOL = 1e-9;

function namedParameter(d: Diagram, name: string) {
  const p = d.parameters.find((x) => x.name === name);
  if (!p) {
    const known = d.parameters.map((x) => x.name).join(', ') || 'none';
    throw new InputError(`sweep parameter "${name}" is not a named parameter of the diagram (known: ${known})`, { field: 'parameter' });
  }
  return p;
}

/** The range swept: the diagram's sweep of that parameter, else the parameter's slider range, else a decade each side. */
export function sweepRange(d: Diagram, name: string, value: number): { min: number; max: number; scale: 'linear' | 'log' } {
  const sw: Sweep | undefined = d.sweeps.find((s) => s.parameter === name);
  if (sw) return { min: sw.min, max: sw.max, scale: sw.scale };
  const p = namedParameter(d, name);
  if (p.min !== undefined && p.max !== undefined) return { min: p.min, max: p.max, scale: p.scale ?? (p.min > 0 ? 'log' : 'linear') };
  const v = Math.abs(value) || 1;
  return value >= 0 ? { min: v / 10, max: v * 10, scale: 'log' } : { min: -v * 10, max: -v / 10, scale: 'linear' };
}

/**
 * The characteristic polynomial as D0 + k·N0 when it is affine in the parameter (checked at
 * three values of one sign, so that sign-restricted fields stay valid), else null.
 */
export function affineSplit(
  d: Diagram,
  name: string,
  overrides: ParameterOverrides = {},
  opts: ReduceOptions = {},
): { n0: number[]; d0: number[]; handling: DelayHandling } | null {
  const v = overrides[name] ?? namedParameter(d, name).value;
  const base = v !== 0 ? v : 1;
  let ks = [base, base * 1.7, base * 0.45];
  const at = (k: number) => characteristicPolynomial(d, { ...overrides, [name]: k }, opts);
  let cps: ReturnType<typeof at>[];
  try {
    cps = ks.map(at);
  } catch (err) {
    // A field refused one of the trial values (e.g. above its limit): try inside the sweep range.
    if (!(err instanceof InputError)) throw err;
    const r = sweepRange(d, name, v);
    ks = [0.25, 0.5, 0.75].map((f) => r.min + (r.max - r.min) * f);
    cps = ks.map(at);
  }
  const [p1, p2, p3] = cps.map((c) => c.poly);
  const n0 = poly.scale(poly.sub(p2, p1), 1 / (ks[1] - ks[0]));
  const d0 = poly.sub(p1, poly.scale(n0, ks[0]));
  // Coefficient by coefficient, relative to the size of that coefficient in the samples (the
  // coefficients of a multi-loop determinant span many decades).
  const len = Math.max(p1.length, p2.length, p3.length);
  const size = (i: number) => Math.max(Math.abs(p1[i] ?? 0), Math.abs(p2[i] ?? 0), Math.abs(p3[i] ?? 0));
  for (let i = 0; i < len; i++) {
    const r = (p3[i] ?? 0) - ((d0[i] ?? 0) + ks[2] * (n0[i] ?? 0));
    if (Math.abs(r) > AFFINE_TOL * size(i)) return null;
  }
  // A coefficient that does not change with k beyond round-off belongs to D0 alone.
  const clean = (p: number[], ref: (i: number) => number) => poly.trim(p.map((c, i) => (Math.abs(c) <= 1e-13 * ref(i) ? 0 : c)));
  const kScale = Math.max(...ks.map(Math.abs));
  return { n0: clean(n0, (i) => size(i) / kScale), d0: clean(d0, size), handling: cps[0].handling };
}

export function sweepLocus(d: Diagram, parameter: string, overrides: ParameterOverrides = {}, opts: SweepOptions = {}): SweepLocus {
  const value = overrides[parameter] ?? namedParameter(d, parameter).value;
  const split = affineSplit(d, parameter, overrides, opts);
  const range = sweepRange(d, parameter, value);
  if (split && !poly.isZero(split.n0) && !poly.isZero(split.d0)) {
    // A root shared by N0 and D0 is a closed-loop pole for every k: it is reported apart and
    // left out of the geometry (cancelCommon keeps N/D, so k keeps its meaning).
    const c = cancelCommon(rational(split.n0, split.d0), 1e-7);
    // The whole geometry is traced (branches reach their zeros/asymptotes) unless kMax is given.
    const locus = rootLocus(c.result.num, c.result.den, {
      negative: opts.negative,
      ...(opts.deadline !== undefined ? { deadline: opts.deadline } : {}),
      ...(opts.kMax !== undefined ? { kMax: opts.kMax } : {}),
      ...(opts.samples ? { samples: opts.samples } : {}),
    });
    return { mode: 'exact', parameter, value, locus, n0: split.n0, d0: split.d0, fixedPoles: c.cancelled, delayHandling: split.handling };
  }
  const reason = split
    ? poly.isZero(split.n0)
      ? `the closed-loop poles do not depend on ${parameter} (it enters outside every loop)`
      : `the characteristic polynomial is affine in ${parameter} but vanishes at ${parameter} = 0`
    : `${parameter} does not enter the characteristic polynomial affinely (it enters more than once or in a denominator)`;
  return sampledLocus(d, parameter, value, range, overrides, opts, reason);
}

function sampleValues(min: number, max: number, scale: 'linear' | 'log', n: number): number[] {
  const out: number[] = [];
  const log = scale === 'log' && min > 0 && max > 0;
  for (let i = 0; i < n; i++) {
    const f = n === 1 ? 0 : i / (n - 1);
    out.push(log ? min * (max / min) ** f : min + (max - min) * f);
  }
  return out;
}

/** Root pairing between samples: the one home is @loopwright/lti's matchRoots (re-exported for callers). */
export { matchRoots };

function sampledLocus(
  d: Diagram,
  parameter: string,
  value: number,
  range: { min: number; max: number; scale: 'linear' | 'log' },
  overrides: ParameterOverrides,
  opts: SweepOptions,
  reason: string,
): SweepLocus {
  if (!(range.max > range.min))
    throw new InputError(`sweep of ${parameter}: max ${range.max} must be above min ${range.min}`, { field: 'max' });
  let handling: DelayHandling | null = null;
  const rootsAt = (k: number) => {
    checkDeadline(opts.deadline, `sweep of ${parameter}`);
    const cp = characteristicPolynomial(d, { ...overrides, [parameter]: k }, opts);
    handling ??= cp.handling;
    return polyRoots(cp.poly);
  };
  const values = sampleValues(range.min, range.max, range.scale, Math.max(2, opts.samples ?? 60));
  let samples = values.map((k) => ({ k, roots: rootsAt(k) }));
  // Refine: where a matched root jumps by more than 10 % of the local root scale, bisect (bounded).
  for (let pass = 0; pass < 4; pass++) {
    const out = [samples[0]];
    let added = 0;
    for (let i = 1; i < samples.length; i++) {
      const a = samples[i - 1];
      const b = samples[i];
      const perm = matchRoots(a.roots, b.roots);
      const scale = Math.max(1e-9, ...a.roots.map(cabs), ...b.roots.map(cabs));
      const jump = Math.max(0, ...perm.map((j, k) => (j >= 0 ? cabs(csub(a.roots[k], b.roots[j])) : 0)));
      if (jump > 0.1 * scale && added < 200) {
        const mid = range.scale === 'log' && a.k > 0 && b.k > 0 ? Math.sqrt(a.k * b.k) : (a.k + b.k) / 2;
        out.push({ k: mid, roots: rootsAt(mid) });
        added++;
      }
      out.push(b);
    }
    samples = out;
    if (added === 0) break;
  }
  // Join into branches; a change in the number of roots starts or ends branches.
  const branches: { s: Complex; k: number }[][] = samples[0].roots.map((s) => [{ s, k: samples[0].k }]);
  let open = branches.map((_, i) => i); // branch index of each root of the previous sample
  for (let i = 1; i < samples.length; i++) {
    const prev = samples[i - 1].roots;
    const next = samples[i].roots;
    const perm = matchRoots(prev, next);
    const nextOpen = new Array<number>(next.length).fill(-1);
    perm.forEach((j, r) => {
      if (j >= 0) nextOpen[j] = open[r];
    });
    for (let j = 0; j < next.length; j++) {
      if (nextOpen[j] < 0) {
        nextOpen[j] = branches.length;
        branches.push([]);
      }
      branches[nextOpen[j]].push({ s: next[j], k: samples[i].k });
    }
    open = nextOpen;
  }
  return { mode: 'sampled', parameter, value, values: samples.map((s) => s.k), branches, reason, delayHandling: handling! };
}
