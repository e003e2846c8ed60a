import { type Complex, InputError, type LoopMargins, type LoopSource, type TransferFunction, checkDeadline } from '@loopwright/lti';
import type { Diagram } from '../document-types.ts';
import type { ParameterOverrides } from '../resolve.ts';
import { type Branch, type CompiledGraph } from './linear-graph.ts';
import { flowGraph, simpleCycles } from './mason.ts';
import { type CutFrequencyMethod, type CutLoop, cutMargins } from './cuts.ts';
import { type DelayHandling, type ReduceOptions, closedLoopPoles, compiledOf } from './reduce.ts';

/**
 * The usual cascade rule: the inner loop should be 3–10 times faster than the loop around it
 * (common practice, no source). Below 3 the loops interact and are flagged.
 */
export const MIN_SEPARATION = 3;

export interface CutAnalysis {
  /** Cut id (or "auto:<wire>" for a cut proposed on a feedback wire when the diagram has none). */
  cut: string;
  wire: string;
  label: string;
  auto: boolean;
  /** L(s) at the cut with every other loop closed (1 + L = 0). */
  loop: TransferFunction;
  /** How dead times enter L(s) (the closed-loop poles): exact when outside every other loop, else Padé. */
  delayHandling: DelayHandling;
  /** How L(jω) was evaluated for the margins: every dead time exact (solved at s = jω where needed). */
  frequency: CutFrequencyMethod;
  /** The exact L(jω) where it differs from L(s) (dead times inside other loops), else null: see cutLoopResponse. */
  source: LoopSource | null;
  hiddenModes: Complex[];
  margins: LoopMargins;
  /** Gain crossover (rad/s), null if |L| never crosses 1. */
  crossover: number | null;
  /** Closed-loop bandwidth of T = L/(1 + L) (rad/s). */
  bandwidth: number | null;
  /** Blocks on the loops through this wire. */
  blocks: string[];
  stable: boolean;
  /**
   * The same loop as tuned inner-first: every cut whose loop encloses this one opened (its
   * own inner loops stay closed). Separation ratios use these figures.
   */
  alone: { loop: TransferFunction; margins: LoopMargins; crossover: number | null; bandwidth: number | null; opened: string[] };
}

export interface Separation {
  inner: string;
  outer: string;
  /** inner/outer closed-loop bandwidth when both exist, else the crossover ratio (loops as tuned inner-first, see CutAnalysis.alone). */
  ratio: number | null;
  basis: 'bandwidth' | 'crossover' | 'none';
  crossoverRatio: number | null;
  bandwidthRatio: number | null;
  /** True when ratio < MIN_SEPARATION (or cannot be computed). */
  flag: boolean;
  note: string;
}

export interface OuterVsIdeal {
  outer: string;
  inner: string;
  /** Outer loop margins with the real inner loop (loops around the outer one opened, as in CutAnalysis.alone). */
  real: LoopMargins;
  /** Outer loop margins with the inner loop replaced by an ideal (unity) one. */
  ideal: LoopMargins;
  idealLoop: TransferFunction;
}

export interface LoopsReport {
  cuts: CutAnalysis[];
  separations: Separation[];
  outerVsIdeal: OuterVsIdeal[];
  closedLoopPoles: Complex[];
  stable: boolean;
  notes: string[];
}

/** Blocks on the simple cycles that pass through each wire's branch. */
function loopBlocksByWire(c: CompiledGraph): Map<string, Set<string>> {
  const fg = flowGraph(c.ids.length, c.num, c.den, c.branches);
  const cycles = simpleCycles(fg);
  const edgeCycles = new Map<string, Set<number>>(); // "from>to" → node set
  for (const cy of cycles) {
    const k = cy.nodes.length;
    for (let i = 0; i < k; i++) {
      const key = `${cy.nodes[i]}>${cy.nodes[(i + 1) % k]}`;
      const set = edgeCycles.get(key) ?? new Set<number>();
      cy.nodes.forEach((v) => set.add(v));
      edgeCycles.set(key, set);
    }
  }
  const out = new Map<string, Set<string>>();
  for (const b of c.branches) {
    if (b.to < 0) continue;
    const set = edgeCycles.get(`${b.from}>${b.to}`);
    if (set) out.set(b.wire, new Set([...set].map((v) => c.ids[v])));
  }
  return out;
}

/** Feedback wires: a negative summing-junction input on a loop (where an engineer opens it). */
export function feedbackWires(c: CompiledGraph): string[] {
  const onLoop = loopBlocksByWire(c);
  const neg = c.branches.filter((b) => b.to >= 0 && c.kinds[b.to] === 'sum' && b.weight < 0 && onLoop.has(b.wire));
  return neg.map((b) => b.wire);
}

/**
 * The diagram with the loop opened at `wire` replaced by an ideal one: the controlled signal
 * follows its set-point exactly, i.e. the summing junction the wire enters sees zero error.
 * The controlled signal is found by walking back from the wire through the measurement chain
 * (blocks that only feed the loop's return path: encoders, sensor lags, dead times) to the
 * first signal used elsewhere; with g the chain's static gain, w·g·y + Σ other inputs = 0 ⇒
 * y = −Σ(w_e·x_e)/(w·g). Forcing the sensor output instead would leave the real plant driven by
 * a controller that sees no feedback.
 */
export function withIdealInnerLoop(c: CompiledGraph, wire: string): CompiledGraph {
  const br = c.wireIndex.get(wire);
  if (!br || br.to < 0 || c.kinds[br.to] !== 'sum') {
    throw new InputError(`wire ${wire}: an ideal inner loop needs the cut to enter a summing junction`, { field: 'wire' });
  }
  const j = br.to;
  let a = br.from;
  let sensorGain = 1;
  for (let guard = 0; guard < c.ids.length; guard++) {
    if (c.kinds[a] !== 'transfer') break;
    const outs = c.branches.filter((b) => b.from === a && b.to >= 0);
    const ins = c.branches.filter((b) => b.to === a);
    if (outs.length !== 1 || ins.length !== 1 || ins[0].from < 0) break;
    const n0 = c.num[a][0] ?? 0;
    const d0 = c.den[a][0] ?? 0;
    const g = (n0 / d0) * ins[0].weight;
    if (!Number.isFinite(g) || g === 0) break; // an integrating or differentiating element is no sensor
    sensorGain *= g;
    a = ins[0].from;
  }
  const num = c.num.slice();
  const den = c.den.slice();
  const delay = c.delay.slice();
  num[a] = [1];
  den[a] = [1];
  delay[a] = 0;
  const branches: Branch[] = c.branches.filter((b) => b.wire !== wire && b.to !== a);
  for (const b of c.branches) {
    if (b.to === j && b.wire !== wire) {
      branches.push({ wire: `${b.wire}~ideal`, from: b.from, to: a, weight: -b.weight / (br.weight * sensorGain), toBlock: c.ids[a] });
    }
  }
  const kinds = c.kinds.slice();
  kinds[a] = 'sum';
  return { ...c, kinds, num, den, delay, branches, wireIndex: new Map(branches.map((b) => [b.wire, b])) };
}

/** The compiled graph without the given wires (opened loops). */
export function withoutWires(c: CompiledGraph, wires: readonly string[]): CompiledGraph {
  if (wires.length === 0) return c;
  const drop = new Set(wires);
  const branches = c.branches.filter((b) => !drop.has(b.wire));
  return { ...c, branches, wireIndex: new Map(branches.map((b) => [b.wire, b])) };
}

const ratioOf = (a: number | null, b: number | null) => (a !== null && b !== null && b > 0 ? a / b : null);

/**
/**
 * How analyseLoops reads one loop and the whole diagram's poles. `config` names the graph's
 * configuration ('closed': every other loop closed; 'alone:<wires>': those opened;
 * 'ideal:<inner>|<wires>': the inner loop ideal, those opened), so that a caller sweeping one
 * value can precompute what does not change and keep readings the value cannot reach.
 * A reading is what cutMargins gives: the margins (dead times exact in L(jω)) and the cut's loop.
 */
export interface LoopReader {
  read(graph: CompiledGraph, wire: string, config: string): { margins: LoopMargins; loop: CutLoop };
  poles(graph: CompiledGraph): Complex[];
}

/** The reading from scratch: cutMargins at the cut (its deadline, source and frequency method kept). */
export function plainLoopReader(opts: ReduceOptions = {}): LoopReader {
  return {
    read: (g, wire) => cutMargins(g, wire, undefined, opts),
    poles: (g) => closedLoopPoles(g, undefined, opts),
  };
}

/**
 * Every cut's margins (dead times exact in L(jω)), the loops as tuned inner-first, separations,
 * outer loops against ideal inner ones, and the closed-loop poles. `opts.deadline` bounds the
 * wall time (BudgetError('time')). `reader` reads each loop (default: from scratch).
 */
export function analyseLoops(
  d: Diagram,
  overrides?: ParameterOverrides,
  opts: ReduceOptions = {},
  reader: LoopReader = plainLoopReader(opts),
): LoopsReport {
  const c = compiledOf(d, overrides);
  const notes: string[] = [];
  const onLoop = loopBlocksByWire(c);
  let cutList = d.cuts.map((cut) => ({ cut: cut.id, wire: cut.wire, label: cut.label ?? cut.wire, auto: false }));
  if (cutList.length === 0) {
    cutList = feedbackWires(c).map((w) => ({ cut: `auto:${w}`, wire: w, label: w, auto: true }));
    if (cutList.length)
      notes.push(`the diagram has no cuts: proposed one on each feedback wire (${cutList.map((x) => x.wire).join(', ')})`);
    else notes.push('the diagram has no cuts and no feedback wire to propose one on');
  }
  const cuts: CutAnalysis[] = [];
  const valid = cutList.filter((k) => {
    if (onLoop.has(k.wire)) return true;
    notes.push(`cut ${k.cut} on wire ${k.wire}: no feedback loop passes through this wire`);
    return false;
  });
  const blocksOf = (w: string) => [...onLoop.get(w)!].sort();
  // Loop B encloses loop A when B's loops pass through the junction where A's feedback enters
  // (A's error is formed inside B's forward path) and not the other way round.
  const junction = (w: string) => c.branches[c.branches.findIndex((b) => b.wire === w)].toBlock;
  const enclosesWire = (outerWire: string, innerWire: string) =>
    outerWire !== innerWire && onLoop.get(outerWire)!.has(junction(innerWire)) && !onLoop.get(innerWire)!.has(junction(outerWire));
  for (const k of valid) {
    try {
      cuts.push(analyseCut(k));
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      notes.push(`cut ${k.cut} on wire ${k.wire}: ${err.message}`);
    }
  }
  function analyseCut(k: (typeof valid)[number]): CutAnalysis {
    checkDeadline(opts.deadline, 'loops report');
    const { margins, loop } = reader.read(c, k.wire, 'closed');
    const r = loop.reduction;
    const mine = blocksOf(k.wire);
    const opened = valid.filter((o) => enclosesWire(o.wire, k.wire)).map((o) => o.wire);
    const alone = opened.length ? reader.read(withoutWires(c, opened), k.wire, `alone:${opened.join(',')}`) : null;
    const aloneMargins = alone ? alone.margins : margins;
    return {
      ...k,
      alone: {
        loop: alone ? alone.loop.reduction.tf : r.tf,
        margins: aloneMargins,
        crossover: aloneMargins.gainCrossover,
        bandwidth: aloneMargins.bandwidth,
        opened,
      },
      loop: r.tf,
      delayHandling: r.delayHandling,
      frequency: loop.frequency,
      source: loop.source,
      hiddenModes: r.hiddenModes,
      margins,
      crossover: margins.gainCrossover,
      bandwidth: margins.bandwidth,
      blocks: mine,
      stable: margins.closedLoopStable,
    };
  }
  // Nesting (enclosesWire): pair each inner loop with the smallest loop around it.
  const separations: Separation[] = [];
  const outerVsIdeal: OuterVsIdeal[] = [];
  for (const inner of cuts) {
    const around = cuts.filter((o) => enclosesWire(o.wire, inner.wire));
    if (around.length === 0) continue;
    const outer = around.reduce((m, o) => (o.blocks.length < m.blocks.length ? o : m));
    const bandwidthRatio = ratioOf(inner.alone.bandwidth, outer.alone.bandwidth);
    const crossoverRatio = ratioOf(inner.alone.crossover, outer.alone.crossover);
    const ratio = bandwidthRatio ?? crossoverRatio;
    const basis = bandwidthRatio !== null ? 'bandwidth' : crossoverRatio !== null ? 'crossover' : 'none';
    const flag = ratio === null || ratio < MIN_SEPARATION;
    separations.push({
      inner: inner.cut,
      outer: outer.cut,
      ratio,
      basis,
      crossoverRatio,
      bandwidthRatio,
      flag,
      note:
        ratio === null
          ? 'separation not computable (a loop has no crossover or bandwidth)'
          : flag
            ? `inner loop only ${ratio.toFixed(2)}× faster than the outer (${basis}); 3–10× is the usual rule (common practice, no source)`
            : `inner loop ${ratio.toFixed(2)}× faster than the outer (${basis})`,
    });
    try {
      // Both readings with the loops around the outer one opened (as tuned inner-first).
      checkDeadline(opts.deadline, 'loops report');
      const ideal = withIdealInnerLoop(withoutWires(c, outer.alone.opened), inner.wire);
      const idealCut = reader.read(ideal, outer.wire, `ideal:${inner.wire}|${outer.alone.opened.join(',')}`);
      outerVsIdeal.push({
        outer: outer.cut,
        inner: inner.cut,
        real: outer.alone.margins,
        ideal: idealCut.margins,
        idealLoop: idealCut.loop.reduction.tf,
      });
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      notes.push(`outer loop ${outer.cut} against an ideal inner loop ${inner.cut}: ${err.message}`);
    }
  }
  const poles = reader.poles(c);
  const scale = Math.max(1, ...poles.map((p) => Math.hypot(p.re, p.im)));
  return { cuts, separations, outerVsIdeal, closedLoopPoles: poles, stable: poles.every((p) => p.re < -1e-9 * scale), notes };
}
