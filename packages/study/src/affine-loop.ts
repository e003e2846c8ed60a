/**
 * Live sweeps of a value that enters the linear model once (a gain, a controller's Kp): by
 * multilinearity of the interconnection determinant, the loop L read at any cut, with any set
 * of loops opened, is (A + k·B)/(C + k·D) in that value k, with polynomials A..D that do not
 * depend on k. They are found once per diagram edit (three reductions; the third checks the
 * affinity) and a slider step then costs a normalisation and the margins of L(k) — and nothing
 * for readings the value cannot reach (B = D = 0), whose reduction and margins are kept.
 * Dead times are kept exact: the loop's own delay factor on L(s); dead times inside other loops
 * through the exact L(jω), tabulated once per edit (affine-exact.ts).
 * A value that enters more than once, in a dead time, or not affinely is swept by full
 * recomputation; every result says which path it took (`SweepPath`).
 */
import {
  RATIONAL_FREQUENCY,
  compiledOf,
  divideExactly,
  loopAtCutDetailed,
  plainLoopReader,
  reductionOf,
  type CompiledGraph,
  cutLoop,
  exactEvaluator,
  prepareCut,
  type CutFrequencyMethod,
  type CutLoop,
  type DelayHandling,
  type Reduction,
  type Diagram,
  type LoopReader,
  type ReduceOptions,
} from '@loopwright/graph';
import { InputError, cx, loopMargins, loopMarginsOf, poly, polyRoots, type Complex, type LoopMargins } from '@loopwright/lti';
import { exactGrid, exactSourceAt, tabulate, type ExactTable } from './affine-exact.ts';
import { Lru, cached } from './cache.ts';
import { registerCache } from './caches.ts';
import { engineText } from './fingerprint.ts';
import { characteristicAt, without } from './split.ts';
import { engineParameterName } from './sweep-target.ts';
import type { LiveValue, SweepPath } from './types.ts';

/** Where the value enters the compiled model: one node's numerator or denominator, p0 + k·p1. */
interface Site {
  node: number;
  side: 'num' | 'den';
  p0: number[];
  p1: number[];
  /** Sample values: the pieces of every reading are fitted at the first two and checked at the third. */
  ks: [number, number, number];
}

/** L(s) of a reading at k: (a + k·b)/(c + k·d), times e^(−s·delay), as the reduction gives it. */
interface RationalPieces {
  a: number[];
  b: number[];
  c: number[];
  d: number[];
  /** The loop's own delay factor (exact); dead times inside other loops are in `handling` (Padé). */
  delay: number;
  handling: DelayHandling;
  /** Modes divided out of all four pieces once (see commonFactor). */
  hidden: Complex[];
}

/**
 * One reading's pieces: 'affine' where L(jω) is L(s)'s own (rational, or with its delay factor
 * exact); 'exact' where dead times sit inside other loops, so that the exact L(jω) comes from the
 * diagram solved at s = jω (tabulated once, see affine-exact.ts); a reading k cannot reach; or one
 * read in full.
 */
type Pieces =
  | ({ kind: 'affine' } & RationalPieces)
  | ({
      kind: 'exact';
      table: ExactTable;
      frequency: CutFrequencyMethod;
      /** The compiled graph and site the pieces were fitted on: the diagram at k, solved between grid points. */
      graph: CompiledGraph;
      site: Site;
    } & RationalPieces)
  | { kind: 'constant'; reading: Reading }
  | { kind: 'full' };

/** A reading as graph's cutMargins gives it: the margins and the cut's loop (source, frequency method). */
interface Reading {
  margins: LoopMargins;
  loop: CutLoop;
}

/** Relative size of an affinity residual accepted as round-off (graph's affineSplit uses the same). */
const AFFINE_TOL = 1e-9;

const sites = registerCache(new Lru<Site | null>(24));
const pieces = registerCache(new Lru<Pieces>(48));

const same = (x: readonly number[], y: readonly number[]) => x.length === y.length && x.every((v, i) => v === y[i]);
const at = (p0: readonly number[], p1: readonly number[], k: number) => poly.trim(poly.add(p0, poly.scale(p1, k)));

/** p0 and p1 from samples at ks[0], ks[1], checked at ks[2] coefficient by coefficient; null when not affine. */
function affineFit(samples: readonly (readonly number[])[], ks: readonly number[]): { p0: number[]; p1: number[] } | null {
  const [s1, s2, s3] = samples;
  const p1 = poly.scale(poly.sub(s2, s1), 1 / (ks[1] - ks[0]));
  const p0 = poly.sub(s1, poly.scale(p1, ks[0]));
  const len = Math.max(s1.length, s2.length, s3.length);
  const size = (i: number) => Math.max(Math.abs(s1[i] ?? 0), Math.abs(s2[i] ?? 0), Math.abs(s3[i] ?? 0));
  for (let i = 0; i < len; i++) {
    if (Math.abs((s3[i] ?? 0) - ((p0[i] ?? 0) + ks[2] * (p1[i] ?? 0))) > AFFINE_TOL * size(i)) return null;
  }
  // A coefficient that does not change with k beyond round-off belongs to p0 alone.
  const kScale = Math.max(...ks.map(Math.abs));
  const clean = (p: number[], ref: (i: number) => number) => poly.trim(p.map((c, i) => (Math.abs(c) <= 1e-13 * ref(i) ? 0 : c)));
  return { p0: clean(p0, size), p1: clean(p1, (i) => size(i) / kScale) };
}

/** The one place `name` enters the compiled model (compared at three values), or null. */
function siteOf(d: Diagram, name: string, rest: Record<string, number>, value: number): Site | null {
  const base = value !== 0 && Number.isFinite(value) ? value : 1;
  const ks: [number, number, number] = [base, base * 1.7, base * 0.45];
  let graphs: CompiledGraph[];
  try {
    graphs = ks.map((k) => compiledOf(d, { ...rest, [name]: k }));
  } catch (err) {
    if (err instanceof InputError) return null; // a field refuses a sample value: sweep in full
    throw err;
  }
  const [g1, g2, g3] = graphs;
  if (g1.ids.length !== g2.ids.length || !g1.delay.every((t, i) => t === g2.delay[i])) return null;
  const found: { node: number; side: 'num' | 'den' }[] = [];
  for (let v = 0; v < g1.ids.length; v++) {
    if (!same(g1.num[v], g2.num[v])) found.push({ node: v, side: 'num' });
    if (!same(g1.den[v], g2.den[v])) found.push({ node: v, side: 'den' });
  }
  if (found.length !== 1) return null;
  const { node, side } = found[0];
  const fit = affineFit([g1[side][node], g2[side][node], g3[side][node]], ks);
  return fit ? { node, side, ...fit, ks } : null;
}

/** The graph with the site's polynomial at value k. */
function withSite(g: CompiledGraph, s: Site, k: number): CompiledGraph {
  const arr = g[s.side].slice();
  arr[s.node] = at(s.p0, s.p1, k);
  return { ...g, [s.side]: arr };
}

/** Does the graph carry the site's polynomial at k (a configuration may have replaced that node)? */
function carries(g: CompiledGraph, s: Site, k: number): boolean {
  const p = g[s.side][s.node];
  const q = at(s.p0, s.p1, k);
  const scale = Math.max(1e-300, ...q.map(Math.abs));
  return p.length === q.length && p.every((c, i) => Math.abs(c - q[i]) <= 1e-12 * scale);
}

function piecesOf(g: CompiledGraph, wire: string, s: Site, value: number, plain: LoopReader, opts: ReduceOptions): Pieces {
  if (!carries(g, s, value)) return { kind: 'constant', reading: plain.read(g, wire, '') };
  const rs = s.ks.map((k) => loopAtCutDetailed(withSite(g, s, k), wire, undefined, opts));
  const [r1, r2, r3] = rs;
  if (r2.delay !== r1.delay || r3.delay !== r1.delay || r1.delayHandling.mode !== r2.delayHandling.mode) return { kind: 'full' };
  const num = affineFit(
    rs.map((r) => r.rawNumerator),
    s.ks,
  );
  const den = affineFit(
    rs.map((r) => r.rawDenominator),
    s.ks,
  );
  if (!num || !den) return { kind: 'full' };
  if (poly.isZero(num.p1) && poly.isZero(den.p1)) return { kind: 'constant', reading: plain.read(g, wire, '') };
  const pieces = { a: num.p0, b: num.p1, c: den.p0, d: den.p1 };
  // Modes the loop cannot see (block factors common to both sides) are the same at every k when
  // they divide all four pieces: divided out once here, so that a step need not look for them.
  const common = commonFactor(r1.hiddenModes, pieces);
  const kept = { ...(common ?? pieces), delay: r1.delay };
  const hidden = common ? r1.hiddenModes : [];
  // A purely rational loop, or one whose only dead time is its own delay factor: L(jω) is the
  // pieces' (the delay factor exact). Dead times inside other loops: the approximant's pieces
  // give L(s) and its poles, the diagram solved at s = jω (tabulated) the exact L(jω).
  if (r1.delayHandling.mode !== 'pade') return { kind: 'affine', ...kept, handling: r1.delayHandling, hidden };
  const exact = exactPieces(g, wire, s, rs, opts);
  return exact ? { kind: 'exact', ...kept, handling: r1.delayHandling, hidden, ...exact, graph: g, site: s } : { kind: 'full' };
}

/** The exact L(jω) tabulated for a reading with dead times inside other loops, or null (read in full). */
function exactPieces(
  g: CompiledGraph,
  wire: string,
  s: Site,
  rs: readonly Reduction[],
  opts: ReduceOptions,
): { table: ExactTable; frequency: CutFrequencyMethod } | null {
  const loops = s.ks.map((k) => cutLoop(withSite(g, s, k), wire, undefined, opts));
  const sources = loops.map((l) => l.source);
  if (!sources[0] || !sources[1] || !sources[2]) return null;
  const delaySum = sources[0].delaySum;
  const inner = Math.max(0, delaySum - rs[0].tf.delay);
  const grid = exactGrid(
    rs.map((r) => ({ num: r.tf.rational.num, den: r.tf.rational.den, delay: r.tf.delay })),
    delaySum,
    inner,
  );
  if (!grid) return null;
  const k4 = 0.5 * (s.ks[0] + s.ks[1]);
  const check = cutLoop(withSite(g, s, k4), wire, undefined, opts).source;
  if (!check) return null;
  const ev = sources.map((x) => x!.evaluate.bind(x)) as unknown as ExactTable['evaluators'];
  const table = tabulate(grid, s.ks, ev, delaySum, { k: k4, evaluate: (w) => check.evaluate(w) }, opts.deadline);
  return table ? { table, frequency: { ...loops[0].frequency } } : null;
}

/** The pieces divided by the polynomial of `modes`, when it divides every one of them exactly. */
function commonFactor(
  modes: readonly Complex[],
  p: Record<'a' | 'b' | 'c' | 'd', number[]>,
): Record<'a' | 'b' | 'c' | 'd', number[]> | null {
  if (modes.length === 0) return null;
  const f = poly.fromRoots(modes);
  const out = {} as Record<'a' | 'b' | 'c' | 'd', number[]>;
  for (const key of ['a', 'b', 'c', 'd'] as const) {
    if (poly.isZero(p[key])) {
      out[key] = [];
      continue;
    }
    const q = divideExactly(p[key], f);
    if (!q) return null;
    out[key] = q;
  }
  return out;
}

/** L(s) at k from its pieces, normalised and cancelled as graph's reduction does. */
function reductionAt(p: Extract<Pieces, { kind: 'affine' | 'exact' }>, k: number, wire: string): Reduction {
  const num = at(p.a, p.b, k);
  if (poly.isZero(num))
    throw new InputError(`wire ${wire}: no feedback loop passes through this wire (the loop transfer there is zero)`, { field: 'wire' });
  const reduction = reductionOf({ num, den: at(p.c, p.d, k), delay: p.delay, handling: p.handling });
  if (p.hidden.length) reduction.hiddenModes = [...p.hidden, ...reduction.hiddenModes];
  return reduction;
}

/** The reading at k from its pieces: cutMargins' figures, the loop as cutLoop gives it. */
function evaluate(p: Extract<Pieces, { kind: 'affine' | 'exact' }>, k: number, wire: string, deadline: number | undefined): Reading {
  const reduction = reductionAt(p, k, wire);
  const dl = deadline === undefined ? {} : { deadline };
  if (p.kind === 'exact') {
    const source = exactSourceAt(p.table, k, reduction.tf, () => {
      const ev = exactEvaluator(prepareCut(withSite(p.graph, p.site, k), wire));
      return (w) => {
        const v = ev(w);
        return cx(-v.re, -v.im); // L = −r/u (graph's cutLoop)
      };
    });
    return {
      loop: { reduction, source, frequency: { ...p.frequency } },
      margins: loopMarginsOf(source, { ...dl, gridFrom: p.table.omega }),
    };
  }
  // L(s) itself, its delay factor (if any) exact: loopMargins as cutMargins does (cheap: the
  // pieces spare the diagram reduction; no solving).
  const frequency: CutFrequencyMethod =
    p.delay > 0
      ? { method: 'exact', solved: false, note: `dead time ${reduction.tf.delay} s kept exact as e^(-jωT)` }
      : { ...RATIONAL_FREQUENCY };
  return { loop: { reduction, source: null, frequency }, margins: loopMargins(reduction.tf, dl) };
}

/** A loop reader for one live value, and which path each reading took. */
export interface LiveReader {
  reader: LoopReader;
  /** The reading at a cut with every other loop closed; the graph is compiled only when needed. */
  readClosed(wire: string, graph: () => CompiledGraph): Reading;
  /** 'affine' while every reading (and the poles) came from precomputed pieces. */
  path(): SweepPath;
}

/**
 * The reader for a diagram at the live value: readings from precomputed pieces where the value
 * enters once and affinely, full recomputation otherwise (no live value: always full).
 */
export function liveReader(
  d: Diagram,
  overrides: Record<string, number>,
  live: LiveValue | null | undefined,
  padeOrder: number,
  deadline?: number,
): LiveReader {
  const opts: ReduceOptions = { padeOrder, ...(deadline !== undefined ? { deadline } : {}) };
  const plain = plainLoopReader(opts);
  const plainOnly = (): LiveReader => ({
    reader: plain,
    readClosed: (wire, graph) => plain.read(graph(), wire, 'closed'),
    path: () => 'full',
  });
  if (!live) return plainOnly();
  const name = engineParameterName(live.target);
  const rest = without(overrides, name);
  const value = overrides[name];
  const key = `${engineText(d)}|${name}|${JSON.stringify(rest)}|${padeOrder}`;
  // The document's own value is computed in full: the figures the command line prints for the
  // diagram, to the last digit. Held values in between (a slider drag) take the precomputed path,
  // which agrees to the refinement's precision (crossovers to round-off, peaks to ~1e-8).
  const docValue = d.parameters.find((p) => p.name === name)?.value ?? value;
  if (value === docValue) return plainOnly();
  // The site is found at the document's value, so it stays the same while the slider moves.
  const site = cached(sites, key, () => siteOf(d, name, rest, docValue));
  if (!site) return plainOnly();
  let full = 0;
  const readLazy = (graph: () => CompiledGraph, wire: string, config: string): Reading => {
    const p = cached(pieces, `${key}|${config}|${wire}`, () => piecesOf(graph(), wire, site, value, plain, opts));
    if (p.kind === 'constant') return p.reading;
    if (p.kind === 'affine' || p.kind === 'exact') return evaluate(p, value, wire, deadline);
    full++;
    return plain.read(graph(), wire, config);
  };
  const reader: LoopReader = {
    read: (g, wire, config) => readLazy(() => g, wire, config),
    poles: (g): Complex[] => {
      const ch = characteristicAt(d, overrides, padeOrder, name, deadline);
      return ch.poly.length > 1 ? polyRoots(ch.poly) : plain.poles(g);
    },
  };
  return { reader, readClosed: (wire, graph) => readLazy(graph, wire, 'closed'), path: () => (full === 0 ? 'affine' : 'full') };
}
