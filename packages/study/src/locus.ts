/**
 * The locus of a sweep: every closed-loop pole of the whole diagram as one quantity varies,
 * the others fixed. Exact root-locus geometry when the characteristic polynomial is affine in
 * the swept value — computed by graph's sweepLocus, so the factors common to N0 and D0 are
 * removed (reported as fixed poles) exactly as the command line does — else a sampled locus
 * over the sweep range. The direction follows the sign of the swept value: a negative gain
 * sweeps k < 0 (the negative-gain locus) with its own geometry.
 */
import { DEFAULT_PADE_ORDER, sweepLocus, type Diagram } from '@loopwright/graph';
import { InputError, cancelCommon, polyRoots, rational, rootLocus, type Complex, type LocusPoint } from '@loopwright/lti';
import { Lru, cached } from './cache.ts';
import { registerCache } from './caches.ts';
import { engineText } from './fingerprint.ts';
import { characteristicAt, splitOf, without } from './split.ts';
import { checkTarget, documentValue, engineDiagram, engineParameterName, targetKey, targetRange } from './sweep-target.ts';
import type { LocusAngleData, LocusBranch, LocusData, SweepRange, SweepTarget } from './types.ts';
import { assertAnalysable } from './validate.ts';
import { comparisonOrder, originsOf } from './poles.ts';

export interface LocusRequest {
  target: SweepTarget;
  /** The value in force (its sign sets the direction); default: the document's. */
  value?: number;
  /** The slider range (traced densely; the sampled locus spans it); default: the target's range in the document. */
  range?: SweepRange;
  /** 'auto' (default): the sign of the value; or force one direction. */
  direction?: 'auto' | 'positive' | 'negative';
  /** Also trace the other sign (drawn dashed). */
  opposite?: boolean;
  /** Other parameters' values (CLI --set); a value for the swept one is ignored. */
  overrides?: Record<string, number>;
  padeOrder?: number;
  /** Base samples of the traced geometry (lti rootLocus; default 400). */
  samples?: number;
}

const loci = registerCache(new Lru<LocusData>(12));
const plain = (c: Complex) => ({ re: c.re, im: c.im });
const branchesOf = (br: LocusPoint[][]): LocusBranch[] =>
  br.map((b) => ({ re: b.map((p) => p.s.re), im: b.map((p) => p.s.im), k: b.map((p) => p.k) }));
const angles = (xs: { at: Complex; angleDeg: number; multiplicity: number }[]): LocusAngleData[] =>
  xs.map((a) => ({ at: plain(a.at), angleDeg: a.angleDeg, multiplicity: a.multiplicity }));

export function locusStudy(d: Diagram, req: LocusRequest, deadline?: number): LocusData {
  checkTarget(d, req.target);
  const ed = engineDiagram(d, req.target);
  const { name, range, direction, overrides, padeOrder, identity } = resolved(d, req);
  assertAnalysable(ed, overrides, deadline);
  return cached(loci, `${engineText(ed)}|${identity}`, () =>
    compute(ed, targetKey(req.target), name, range, direction, req.opposite === true, overrides, padeOrder, req.samples, deadline),
  );
}

/**
 * What a locus depends on besides the diagram, as text: target, range, direction, the other
 * parameters, Padé order, samples — the value only through its sign (the direction). Requests of
 * one diagram with the same identity get the same locus, so a slider drag needs it once: the
 * editor leaves the locus out of a step's requests while it holds the one of that identity.
 */
export function locusIdentity(d: Diagram, req: LocusRequest): string {
  checkTarget(d, req.target);
  return resolved(d, req).identity;
}

function resolved(d: Diagram, req: LocusRequest) {
  const name = engineParameterName(req.target);
  const value = req.value ?? documentValue(d, req.target);
  const range = req.range ?? targetRange(d, req.target);
  if (!(range.max > range.min)) throw new InputError(`sweep range: max ${range.max} must be above min ${range.min}`, { field: 'range' });
  const direction: 'positive' | 'negative' =
    req.direction === 'positive' || req.direction === 'negative'
      ? req.direction
      : value < 0 || (value === 0 && range.max <= 0)
        ? 'negative'
        : 'positive';
  const overrides = without(req.overrides ?? {}, name);
  const padeOrder = req.padeOrder ?? DEFAULT_PADE_ORDER;
  const identity = JSON.stringify([name, overrides, range, direction, req.opposite === true, padeOrder, req.samples ?? null]);
  return { name, range, direction, overrides, padeOrder, identity };
}

/** Roots of D0 and N0 (common factors apart, as graph's sweepLocus removes them) at another Padé order. */
function higherOrderRoots(
  d: Diagram,
  name: string,
  overrides: Record<string, number>,
  padeOrder: number,
): { poles: Complex[]; zeros: Complex[]; fixed: Complex[] } | null {
  const s = splitOf(d, name, overrides, padeOrder);
  if (!s) return null;
  const c = cancelCommon(rational(s.n0, s.d0), 1e-7);
  return { poles: polyRoots(c.result.den), zeros: polyRoots(c.result.num), fixed: c.cancelled };
}

function compute(
  ed: Diagram,
  target: string,
  name: string,
  range: SweepRange,
  direction: 'positive' | 'negative',
  opposite: boolean,
  overrides: Record<string, number>,
  padeOrder: number,
  samples: number | undefined,
  deadline: number | undefined,
): LocusData {
  const budget = deadline !== undefined ? { deadline } : {};
  // The sweep range travels in the diagram (graph's sampled locus reads it from there).
  const ranged: Diagram = {
    ...ed,
    sweeps: [{ id: '~study-range', parameter: name, ...range }, ...ed.sweeps.filter((s) => s.parameter !== name)],
  };
  const sw = sweepLocus(ranged, name, overrides, {
    negative: direction === 'negative',
    padeOrder,
    ...(samples ? { samples } : {}),
    ...budget,
  });
  if (sw.mode === 'sampled') {
    const first = sw.branches.filter((b) => b[0].k === sw.values[0]).map((b) => plain(b[0].s));
    return {
      mode: 'sampled',
      target,
      parameter: name,
      direction: range.max <= 0 ? 'negative' : 'positive',
      branches: branchesOf(sw.branches),
      rangeBranches: null,
      oppositeBranches: null,
      poles: first,
      zeros: [],
      fixedPoles: [],
      poleOrigin: originsOf(first, sw.delayHandling.mode === 'pade', () =>
        polyRoots(characteristicAt(ed, { ...overrides, [name]: sw.values[0] }, comparisonOrder(padeOrder)).poly),
      ),
      zeroOrigin: [],
      fixedOrigin: [],
      asymptotes: null,
      realAxisSegments: [],
      breakaways: [],
      crossings: [],
      departures: [],
      arrivals: [],
      n0: null,
      d0: null,
      range,
      delayHandling: sw.delayHandling,
      reason: sw.reason,
    };
  }
  const L = sw.locus;
  // With a dead time inside a loop, D0 and N0 hold a Padé approximant: mark each root by whether
  // it stays put at a Padé order two higher (same split, the common factors found there).
  const pade = sw.delayHandling.mode === 'pade';
  const higher = pade ? higherOrderRoots(ed, name, overrides, comparisonOrder(padeOrder)) : null;
  // The slider's part again, densely: for hit-testing, framing and the current-pole track.
  // A range through zero is traced on both sides of it.
  const part = (negative: boolean, lo: number, hi: number) =>
    hi > lo ? branchesOf(rootLocus(L.num, L.den, { negative, kMin: lo, kMax: hi, samples: 240, ...budget }).branches) : [];
  const rangeBranches =
    range.min >= 0
      ? part(false, range.min, range.max)
      : range.max <= 0
        ? part(true, -range.max, -range.min)
        : [...part(false, 0, range.max), ...part(true, 0, -range.min)];
  return {
    mode: 'exact',
    target,
    parameter: name,
    direction,
    branches: branchesOf(L.branches),
    rangeBranches,
    oppositeBranches: opposite ? branchesOf(rootLocus(L.num, L.den, { negative: direction === 'positive', ...budget }).branches) : null,
    poles: L.poles.map(plain),
    zeros: L.zeros.map(plain),
    fixedPoles: sw.fixedPoles.map(plain),
    poleOrigin: originsOf(L.poles, pade, () => higher?.poles ?? []),
    zeroOrigin: originsOf(L.zeros, pade, () => higher?.zeros ?? []),
    fixedOrigin: originsOf(sw.fixedPoles, pade, () => higher?.fixed ?? []),
    asymptotes: L.asymptotes.centroid === null ? null : { centroid: L.asymptotes.centroid, anglesDeg: [...L.asymptotes.anglesDeg] },
    realAxisSegments: L.realAxisSegments.map((s) => [s.from, s.to] as [number, number]),
    breakaways: L.breakaways.map((b) => ({ s: plain(b.s), gain: b.gain })),
    crossings: L.crossings.map((c) => ({ omega: c.omega, gain: c.gain })),
    departures: angles(L.departures),
    arrivals: angles(L.arrivals),
    n0: [...sw.n0],
    d0: [...sw.d0],
    range,
    delayHandling: sw.delayHandling,
    reason: null,
  };
}
