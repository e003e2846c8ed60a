import { InputError, poly, type TransferFunction } from '@loopwright/lti';

/**
 * The linear model of a diagram as a signal-flow graph. Each block that has an output is a
 * node whose value is its output signal; a wire is a branch from its source block's output to
 * its destination block's input, weighted by the input's sign (summing junctions) or 1.
 * A node's value is its gain applied to the weighted sum of its incoming branches:
 *   y_v = G_v · Σ_e w_e · y_from(e)      (sum blocks: G = 1; sources: no inputs)
 * Probes are not nodes: a probe reads the wire that feeds it.
 *
 * This representation is independent of the block catalogue (tests build it directly);
 * `fromDiagram.ts` builds it from a document through each block's linear form.
 */
export type LinearBlock =
  | { id: string; kind: 'transfer'; tf: TransferFunction }
  | { id: string; kind: 'sum'; signs: number[] }
  | { id: string; kind: 'source' }
  | { id: string; kind: 'probe' };

export interface LinearWire {
  id: string;
  from: string;
  to: string;
  /** Destination input port: "in", or "in1".."inN" on a summing junction. */
  port: string;
}

export interface LinearGraph {
  blocks: LinearBlock[];
  wires: LinearWire[];
}

/** One branch after compilation: node indices and the branch weight. */
export interface Branch {
  wire: string;
  from: number;
  /** Destination node, or -1 when the wire feeds a probe (a measurement, not a node). */
  to: number;
  weight: number;
  toBlock: string;
}

/** The graph in index form, ready for elimination. Node gains as ascending polynomials. */
export interface CompiledGraph {
  ids: string[];
  kinds: ('transfer' | 'sum' | 'source')[];
  index: Map<string, number>;
  num: number[][];
  den: number[][];
  delay: number[];
  branches: Branch[];
  wireIndex: Map<string, Branch>;
  /** Probe id → the wire feeding it (null when unconnected). */
  probes: Map<string, string | null>;
}

export function compileGraph(g: LinearGraph): CompiledGraph {
  const ids: string[] = [];
  const kinds: CompiledGraph['kinds'] = [];
  const index = new Map<string, number>();
  const num: number[][] = [];
  const den: number[][] = [];
  const delay: number[] = [];
  const probes = new Map<string, string | null>();
  const signsOf = new Map<string, number[]>();
  const seen = new Set<string>();
  for (const b of g.blocks) {
    if (seen.has(b.id)) throw new InputError(`block ${b.id}: the id is used twice`, { field: 'blocks' });
    seen.add(b.id);
    if (b.kind === 'probe') {
      probes.set(b.id, null);
      continue;
    }
    index.set(b.id, ids.length);
    ids.push(b.id);
    kinds.push(b.kind);
    if (b.kind === 'transfer') {
      num.push(poly.trim(b.tf.rational.num));
      den.push(poly.trim(b.tf.rational.den));
      delay.push(b.tf.delay);
    } else {
      num.push([1]);
      den.push([1]);
      delay.push(0);
      if (b.kind === 'sum') signsOf.set(b.id, b.signs);
    }
  }
  const branches: Branch[] = [];
  const wireIndex = new Map<string, Branch>();
  for (const w of g.wires) {
    if (wireIndex.has(w.id)) throw new InputError(`wire ${w.id}: the id is used twice`, { field: 'wires' });
    const from = index.get(w.from);
    if (from === undefined) {
      const why = probes.has(w.from) ? 'a probe has no output' : 'no such block';
      throw new InputError(`wire ${w.id}: source block ${w.from}: ${why}`, { field: 'wires' });
    }
    let to = -1;
    let weight = 1;
    if (probes.has(w.to)) {
      probes.set(w.to, w.id);
    } else {
      const t = index.get(w.to);
      if (t === undefined) throw new InputError(`wire ${w.id}: destination block ${w.to}: no such block`, { field: 'wires' });
      if (kinds[t] === 'source')
        throw new InputError(`wire ${w.id}: destination block ${w.to} is a source, which has no input`, { field: 'wires' });
      to = t;
      const signs = signsOf.get(w.to);
      if (signs) {
        const m = /^in(\d+)$/.exec(w.port);
        const k = m ? Number(m[1]) : NaN;
        if (!(k >= 1 && k <= signs.length)) {
          throw new InputError(`wire ${w.id}: block ${w.to} has no input port "${w.port}" (in1..in${signs.length})`, { field: 'wires' });
        }
        weight = signs[k - 1];
      }
    }
    const br: Branch = { wire: w.id, from, to, weight, toBlock: w.to };
    branches.push(br);
    wireIndex.set(w.id, br);
  }
  return { ids, kinds, index, num, den, delay, branches, wireIndex, probes };
}

/** Value at s → ∞ of a node gain (the direct feedthrough); Infinity for an improper gain. */
export function feedthroughOf(num: readonly number[], den: readonly number[]): number {
  const dn = num.length - 1;
  const dd = den.length - 1;
  if (dn < 0) return 0;
  if (dn < dd) return 0;
  if (dn > dd) return Infinity;
  return num[dn] / den[dd];
}
