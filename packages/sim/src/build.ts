import { linearFormWithScope, parameterScope, resolveWithScope } from '@loopwright/graph';
import { InputError, realize, type TransferFunction } from '@loopwright/lti';
import type { CompiledModel } from './compile.ts';
import {
  AW_BACK,
  AW_CONDITIONAL,
  AW_OFF,
  Engine,
  OP_DEADZONE,
  OP_DELAY,
  OP_LTI,
  OP_PID,
  OP_RATE,
  OP_SAT,
  OP_SOURCE,
  OP_SUM,
  SimNode,
} from './engine.ts';
import { History } from './history.ts';
import { shapeCode, sourceBreakpoints } from './sources.ts';

/** One run's engine: the compiled structure with this run's parameter values applied. */
export interface BuiltRun {
  engine: Engine;
  /** Block index → node index of the signal it puts out (a probe: the signal it measures). */
  blockSignal: Int32Array;
  /** Source edges in (0, until). */
  breakpoints: number[];
  /** Distinct positive dead times. */
  delays: number[];
}

const num = (p: Record<string, unknown>, name: string) => Number(p[name]);

export function buildRun(model: CompiledModel, overrides: Record<string, number> | undefined, linear: boolean, until: number): BuiltRun {
  const scope = parameterScope(model.diagram, overrides);
  const nodes: SimNode[] = [];
  const blockSignal = new Int32Array(model.blocks.length).fill(-1);
  /** Node → block whose output feeds its (first) input, or the input list of a sum. */
  const pendingIn: { node: SimNode; from: number[] }[] = [];
  let nStates = 0;
  const breakpoints: number[] = [];
  const add = (nd: SimNode, blockIndex: number) => {
    nd.block = blockIndex;
    nd.self = nodes.length;
    nodes.push(nd);
    return nd;
  };

  for (const cb of model.blocks) {
    if (cb.kind === 'probe') continue;
    const p = resolveWithScope(cb.block, scope) as Record<string, unknown>;
    const nd = new SimNode();
    switch (cb.kind) {
      case 'source': {
        nd.op = OP_SOURCE;
        nd.src = {
          shape: shapeCode(String(p.shape)),
          amplitude: num(p, 'amplitude'),
          start: num(p, 'start'),
          offset: num(p, 'offset'),
          omega: num(p, 'omega'),
          width: num(p, 'width'),
          period: num(p, 'period'),
        };
        breakpoints.push(...sourceBreakpoints(nd.src, until));
        add(nd, cb.index);
        break;
      }
      case 'summing-junction': {
        nd.op = OP_SUM;
        const signs = [...String(p.signs)].map((c) => (c === '-' ? -1 : 1));
        nd.signs = Float64Array.from(signs);
        nd.ins = new Int32Array(signs.length);
        nd.feedthrough = true;
        add(nd, cb.index);
        pendingIn.push({ node: nd, from: cb.inputs });
        break;
      }
      case 'saturation':
      case 'dead-zone':
      case 'rate-limit': {
        linearFormWithScope(cb.block, scope); // checks the limits, naming the block
        nd.feedthrough = true;
        if (linear) {
          nd.op = OP_LTI;
          nd.d = 1;
        } else if (cb.kind === 'rate-limit') {
          nd.op = OP_RATE;
          nd.rising = num(p, 'rising');
          nd.falling = num(p, 'falling');
          nd.so = nStates;
          nd.ns = 1;
          nStates += 1;
          nd.ng = 2;
        } else {
          nd.op = cb.kind === 'saturation' ? OP_SAT : OP_DEADZONE;
          nd.lo = num(p, 'lower');
          nd.hi = num(p, 'upper');
          if (cb.kind === 'dead-zone' || Number.isFinite(nd.lo) || Number.isFinite(nd.hi)) nd.ng = 2;
        }
        add(nd, cb.index);
        pendingIn.push({ node: nd, from: cb.inputs });
        break;
      }
      case 'pid': {
        linearFormWithScope(cb.block, scope); // validates form, gains and limits
        nd.op = OP_PID;
        const parallel = p.form === 'parallel';
        const kp = num(p, 'kp');
        const n = num(p, 'n');
        let ki: number;
        let kd: number;
        if (parallel) {
          ki = num(p, 'ki');
          kd = num(p, 'kd');
        } else {
          const ti = num(p, 'ti');
          ki = Number.isFinite(ti) ? kp / ti : 0;
          kd = kp * num(p, 'td');
        }
        nd.kp = kp;
        nd.ki = ki;
        if (kd !== 0) {
          nd.hasD = true;
          nd.tf = kd / kp / n;
          nd.kdTf = kd / nd.tf;
        }
        nd.so = nStates;
        nd.ns = nd.hasD ? 2 : 1;
        nStates += nd.ns;
        nd.feedthrough = nd.kp + nd.kdTf !== 0;
        nd.tt = num(p, 'tt');
        if (!linear) {
          nd.lo = num(p, 'umin');
          nd.hi = num(p, 'umax');
          const limited = Number.isFinite(nd.lo) || Number.isFinite(nd.hi);
          const aw = String(p.antiWindup);
          nd.aw = !limited || ki === 0 ? AW_OFF : aw === 'back-calculation' ? AW_BACK : aw === 'conditional' ? AW_CONDITIONAL : AW_OFF;
          if (limited) nd.ng = nd.aw === AW_CONDITIONAL ? 3 : 2;
        }
        add(nd, cb.index);
        pendingIn.push({ node: nd, from: cb.inputs });
        break;
      }
      default: {
        const form = linearFormWithScope(cb.block, scope);
        if (form.type !== 'transfer') throw new InputError(`block ${cb.id}: kind ${cb.kind} has no transfer-function form`);
        const tf: TransferFunction = form.tf;
        let input = cb.inputs;
        if (tf.delay > 0 || cb.kind === 'dead-time') {
          const dl = new SimNode();
          dl.op = OP_DELAY;
          dl.delay = tf.delay;
          dl.feedthrough = tf.delay === 0;
          if (tf.delay > 0) dl.hist = new History();
          add(dl, cb.index);
          pendingIn.push({ node: dl, from: input });
          input = [];
          const r = tf.rational;
          if (r.den.length === 1 && r.num.length === 1 && r.num[0] === r.den[0]) {
            blockSignal[cb.index] = dl.self;
            break;
          }
        }
        const ss = realize(tf.rational, `block ${cb.id}`);
        nd.op = OP_LTI;
        nd.ns = ss.A.length;
        nd.so = nStates;
        nStates += nd.ns;
        nd.a = Float64Array.from(nd.ns > 0 ? ss.A[nd.ns - 1].map((v) => -v) : []);
        // scale the states (x = z/σ) so that they have the size of the output: the
        // integrator's absolute tolerance then means the same for a lag of 1 s and of 10 µs
        const sigma = Math.max(...ss.C.map(Math.abs));
        nd.b = sigma > 0 && Number.isFinite(sigma) ? sigma : 1;
        nd.c = Float64Array.from(ss.C.map((v) => v / nd.b));
        nd.d = ss.D;
        nd.feedthrough = ss.D !== 0;
        add(nd, cb.index);
        if (input.length > 0) pendingIn.push({ node: nd, from: input });
        else nd.in0 = nodes.length - 2; // fed by its own dead time
        break;
      }
    }
    if (blockSignal[cb.index] < 0) blockSignal[cb.index] = nodes[nodes.length - 1].self;
  }

  for (const { node, from } of pendingIn) {
    if (node.op === OP_SUM) from.forEach((b, i) => (node.ins[i] = blockSignal[b]));
    else node.in0 = blockSignal[from[0]];
  }
  for (const cb of model.blocks) if (cb.kind === 'probe') blockSignal[cb.index] = blockSignal[cb.inputs[0]];

  // a model without states still needs one (constant) for the integrator
  if (nStates === 0) {
    const dummy = new SimNode();
    dummy.op = OP_SOURCE;
    dummy.src = { shape: 0, amplitude: 0, start: 0, offset: 0, omega: 1, width: 1, period: 2 };
    dummy.ns = 1;
    dummy.so = 0;
    nStates = 1;
    add(dummy, -1);
  }

  const order = topologicalOrder(nodes, model);
  const delays = [...new Set(nodes.filter((n) => n.op === OP_DELAY && n.delay > 0).map((n) => n.delay))].sort((a, b) => a - b);
  return { engine: new Engine(nodes, order, nStates), blockSignal, breakpoints, delays };
}

function inputsOf(nd: SimNode): number[] {
  if (nd.op === OP_SUM) return Array.from(nd.ins);
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
    for (let changed = true; changed; ) {
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
export function statesBehind(engine: Engine, signals: Iterable<number>): number[] {
  const seen = new Uint8Array(engine.nodes.length);
  const states = new Set<number>();
  const stack = [...signals];
  while (stack.length > 0) {
    const k = stack.pop()!;
    if (k < 0 || seen[k]) continue;
    seen[k] = 1;
    const nd = engine.nodes[k];
    for (let j = 0; j < nd.ns; j++) states.add(nd.so + j);
    if (nd.op === OP_DELAY && nd.delay > 0) continue;
    if (nd.feedthrough) stack.push(...inputsOf(nd));
  }
  return [...states].sort((a, b) => a - b);
}
