import { InputError } from '@loopwright/lti';
import type { CompiledGraph } from './linear-graph.ts';

/** A point of the diagram: a block's output (a source, or any block) or a wire. */
export type SignalRef = { block: string } | { wire: string };

export const describeRef = (r: SignalRef): string => ('block' in r ? `block ${r.block}` : `wire ${r.wire}`);

/**
 * A signal graph prepared for one transmission: node gains, branches, the input node (where
 * the injected signal enters) and the output node (what is measured). Extra nodes added
 * here have gain 1 ("sum") or are the injection itself ("source").
 */
export interface SignalGraph {
  ids: string[];
  kinds: ('transfer' | 'sum' | 'source')[];
  num: number[][];
  den: number[][];
  delay: number[];
  branches: { wire: string; from: number; to: number; weight: number }[];
  input: number;
  output: number;
}

const copy = (c: CompiledGraph): Omit<SignalGraph, 'input' | 'output'> => ({
  ids: c.ids.slice(),
  kinds: c.kinds.slice(),
  num: c.num.slice(),
  den: c.den.slice(),
  delay: c.delay.slice(),
  branches: c.branches.map((b) => ({ wire: b.wire, from: b.from, to: b.to, weight: b.weight })),
});

function addNode(g: Omit<SignalGraph, 'input' | 'output'>, id: string, kind: 'sum' | 'source'): number {
  g.ids.push(id);
  g.kinds.push(kind);
  g.num.push([1]);
  g.den.push([1]);
  g.delay.push(0);
  return g.ids.length - 1;
}

function wireOf(c: CompiledGraph, id: string) {
  const br = c.wireIndex.get(id);
  if (!br) throw new InputError(`wire ${id}: no such wire`, { field: 'wire' });
  return br;
}

/**
 * Prepares the transmission from an injection at `from` to a measurement at `to`:
 * - from a source block: that source's output is the input (every other source is zero);
 * - from any other block: a signal added to the block's output (an output disturbance);
 * - from a wire: a signal added on that wire only (the destination sees wire value + injection).
 * A wire is measured as the value it delivers (so injection and measurement on one wire give
 * the sensitivity there); a probe is measured as its input wire; a block as its output.
 */
export function prepareTransmission(c: CompiledGraph, from: SignalRef, to: SignalRef): SignalGraph {
  const g = copy(c);
  let input: number;
  const injectedWire = new Map<string, number>(); // wire id → node that now carries it
  let injectedBlock: { block: number; node: number } | null = null;
  if ('block' in from) {
    const b = c.index.get(from.block);
    if (b === undefined) {
      if (c.probes.has(from.block))
        throw new InputError(`block ${from.block}: a probe is a measurement point, not an input`, { field: 'from' });
      throw new InputError(`block ${from.block}: no such block`, { field: 'from' });
    }
    if (c.kinds[b] === 'source') input = b;
    else {
      // y_b' = y_b + u: a gain-1 node after b takes over all of b's outgoing branches.
      input = addNode(g, `${from.block}+injection`, 'source');
      const node = addNode(g, `${from.block}+`, 'sum');
      for (const br of g.branches) if (br.from === b) br.from = node;
      g.branches.push({ wire: '', from: b, to: node, weight: 1 }, { wire: '', from: input, to: node, weight: 1 });
      injectedBlock = { block: b, node };
    }
  } else {
    const br = wireOf(c, from.wire);
    input = addNode(g, `${from.wire}+injection`, 'source');
    const node = addNode(g, `${from.wire}+`, 'sum');
    const gb = g.branches.find((x) => x.wire === from.wire)!;
    const src = gb.from;
    gb.from = node;
    g.branches.push({ wire: '', from: src, to: node, weight: 1 }, { wire: '', from: input, to: node, weight: 1 });
    injectedWire.set(br.wire, node);
  }
  let output: number;
  if ('wire' in to) {
    const br = wireOf(c, to.wire);
    output = injectedWire.get(to.wire) ?? (injectedBlock && injectedBlock.block === br.from ? injectedBlock.node : br.from);
  } else if (c.probes.has(to.block)) {
    const w = c.probes.get(to.block);
    if (!w) throw new InputError(`block ${to.block}: the probe has no input wire`, { field: 'to' });
    return prepareTransmission(c, from, { wire: w });
  } else {
    const b = c.index.get(to.block);
    if (b === undefined) throw new InputError(`block ${to.block}: no such block`, { field: 'to' });
    output = injectedBlock && injectedBlock.block === b ? injectedBlock.node : b;
  }
  return { ...g, input, output };
}

/**
 * The graph with wire `wireId` broken: a signal injected where the wire ends, the return
 * measured where it starts. Its transmission T gives L = −T (1 + L = 0 convention).
 */
export function prepareCut(c: CompiledGraph, wireId: string): SignalGraph {
  const br = wireOf(c, wireId);
  if (br.to < 0) throw new InputError(`wire ${wireId} feeds probe ${br.toBlock}: no feedback loop passes through it`, { field: 'wire' });
  const g = copy(c);
  const i = g.branches.findIndex((x) => x.wire === wireId);
  const [broken] = g.branches.splice(i, 1);
  const input = addNode(g, `${wireId}+injection`, 'source');
  g.branches.push({ wire: '', from: input, to: broken.to, weight: broken.weight });
  return { ...g, input, output: broken.from };
}

/** The whole diagram as a signal graph without an input or output (for its determinant). */
export function wholeGraph(c: CompiledGraph): SignalGraph {
  return { ...copy(c), input: -1, output: -1 };
}

/** Nodes reachable from the graph's input that also reach its output (the ones a transmission depends on). */
export function relevantNodes(g: SignalGraph): boolean[] {
  const n = g.ids.length;
  const fwd: number[][] = Array.from({ length: n }, () => []);
  const bwd: number[][] = Array.from({ length: n }, () => []);
  for (const b of g.branches) {
    if (b.to < 0 || b.weight === 0) continue;
    fwd[b.from].push(b.to);
    bwd[b.to].push(b.from);
  }
  const mark = (start: number, adj: number[][]) => {
    const seen = new Array<boolean>(n).fill(false);
    const stack = [start];
    seen[start] = true;
    while (stack.length) {
      const v = stack.pop()!;
      for (const x of adj[v])
        if (!seen[x]) {
          seen[x] = true;
          stack.push(x);
        }
    }
    return seen;
  };
  const a = mark(g.input, fwd);
  const b = mark(g.output, bwd);
  return a.map((x, i) => x && b[i]);
}
