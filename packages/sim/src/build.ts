import { linearFormWithScope, parameterScope, resolveWithScope } from '@loopwright/graph';
import { InputError } from '@loopwright/lti';
import type { CompiledModel } from './compile.ts';
import { Network } from './network.ts';
import { holdOp } from './ops/hold.ts';
import { SimNode } from './ops/node.ts';
import { builderFor } from './ops/registry.ts';
import type { BuildContext } from './ops/registry-types.ts';

/** One run's network: the compiled structure with this run's parameter values applied. */
export interface BuiltRun {
  net: Network;
  /** Block index → node index of the signal it puts out (a probe: the signal it measures). */
  blockSignal: Int32Array;
  /** Source nodes (their edges are generated lazily by breakpoints.ts). */
  sources: SimNode[];
  /** Distinct positive dead times, increasing. */
  delays: number[];
  /** Sampled controller nodes (their instants are breakpoints; they step at them). */
  samplers: SimNode[];
}

export function buildRun(model: CompiledModel, overrides: Record<string, number> | undefined, linear: boolean): BuiltRun {
  const scope = parameterScope(model.diagram, overrides);
  const nodes: SimNode[] = [];
  const blockSignal = new Int32Array(model.blocks.length).fill(-1);
  /** Inputs to resolve once every block has its output node: from blocks, or from a node. */
  const pending: { node: SimNode; from: readonly number[] | null; fromNode: SimNode | null }[] = [];
  const sources: SimNode[] = [];
  const samplers: SimNode[] = [];
  let nStates = 0;
  let current = model.blocks[0];

  const ctx: BuildContext = {
    linear,
    scope,
    add(op, cb) {
      const nd = new SimNode(op);
      nd.block = cb ? cb.index : -1;
      nd.self = nodes.length;
      nodes.push(nd);
      if (cb) blockSignal[cb.index] = nd.self;
      return nd;
    },
    states(nd, n) {
      nd.so = nStates;
      nd.ns = n;
      nStates += n;
    },
    wire(nd, from) {
      pending.push({ node: nd, from, fromNode: null });
    },
    wireNode(nd, from) {
      pending.push({ node: nd, from: null, fromNode: from });
    },
    output(cb, nd) {
      blockSignal[cb.index] = nd.self;
    },
    checkLinearForm() {
      return linearFormWithScope(current.block, scope);
    },
    source(nd) {
      sources.push(nd);
    },
    sampler(nd) {
      samplers.push(nd);
    },
  };

  for (const cb of model.blocks) {
    const build = builderFor(cb.kind);
    if (!build) continue;
    current = cb;
    const p = resolveWithScope(cb.block, scope) as Record<string, unknown>;
    build(cb, p, ctx);
  }

  for (const { node, from, fromNode } of pending) {
    if (fromNode) node.in0 = fromNode.self;
    else if (node.ins.length > 0) from!.forEach((b, i) => (node.ins[i] = blockSignal[b]));
    else node.in0 = blockSignal[from![0]];
  }
  for (const cb of model.blocks) if (cb.kind === 'probe') blockSignal[cb.index] = blockSignal[cb.inputs[0]];

  // a model without states still needs one (constant) for the integrator
  if (nStates === 0) ctx.states(ctx.add(holdOp, null), 1);

  const order = topologicalOrder(nodes, model);
  const delays = [...new Set(nodes.filter((n) => n.delay > 0).map((n) => n.delay))].sort((a, b) => a - b);
  return { net: new Network(nodes, order, nStates), blockSignal, sources, delays, samplers };
}

function inputsOf(nd: SimNode): number[] {
  if (nd.ins.length > 0) return Array.from(nd.ins);
  return nd.in0 >= 0 ? [nd.in0] : [];
}

/** Nodes without direct feedthrough first, then the rest in dependency order; a cycle is an algebraic loop. */
function topologicalOrder(nodes: SimNode[], model: CompiledModel): Int32Array {
  const n = nodes.length;
  const indeg = new Int32Array(n);
  const users: number[][] = nodes.map(() => []);
  nodes.forEach((nd, k) => {
    if (!nd.feedthrough) return;
    for (const i of inputsOf(nd)) {
      indeg[k]++;
      users[i].push(k);
    }
  });
  const out: number[] = [];
  const queue: number[] = [];
  for (let k = 0; k < n; k++) if (indeg[k] === 0) queue.push(k);
  while (queue.length > 0) {
    const k = queue.shift()!;
    out.push(k);
    for (const u of users[k]) if (--indeg[u] === 0) queue.push(u);
  }
  if (out.length < n) {
    // keep only nodes on a cycle: drop, repeatedly, stuck nodes that feed no stuck node
    const inLoop = new Uint8Array(n);
    for (let k = 0; k < n; k++) if (indeg[k] > 0) inLoop[k] = 1;
    for (let changed = true; changed;) {
      changed = false;
      for (let k = 0; k < n; k++) {
        if (inLoop[k] && !users[k].some((u) => inLoop[u])) {
          inLoop[k] = 0;
          changed = true;
        }
      }
    }
    const stuck = new Set<string>();
    for (let k = 0; k < n; k++) if (inLoop[k] && nodes[k].block >= 0) stuck.add(model.blocks[nodes[k].block].id);
    throw new InputError(
      `algebraic loop through blocks ${[...stuck].join(', ')}: every block on it passes its input straight through; ` +
        'add dynamics (a lag) or a dead time to the loop',
      { field: 'blocks' },
    );
  }
  return Int32Array.from(out);
}

/** States the given signals depend on within one instant (through direct feedthrough). */
export function statesBehind(net: Network, signals: Iterable<number>): number[] {
  const seen = new Uint8Array(net.nodes.length);
  const states = new Set<number>();
  const stack = [...signals];
  while (stack.length > 0) {
    const k = stack.pop()!;
    if (k < 0 || seen[k]) continue;
    seen[k] = 1;
    const nd = net.nodes[k];
    for (let j = 0; j < nd.ns; j++) states.add(nd.so + j);
    if (nd.delay > 0) continue;
    if (nd.feedthrough) stack.push(...inputsOf(nd));
  }
  return [...states].sort((a, b) => a - b);
}
