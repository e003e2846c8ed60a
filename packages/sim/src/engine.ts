import { History } from './history.ts';
import { sourceValue, type SourceParams } from './sources.ts';

/**
 * The run-time form of a diagram: one node per signal, evaluated in topological order of the
 * direct-feedthrough nodes, states in one Float64 vector. Nonlinear nodes hold a mode that
 * is frozen while the integrator runs (so the right-hand side is smooth inside a segment);
 * guard functions say when a mode stops being valid (a guard turning negative is an event).
 * Everything in the hot path works on preallocated typed arrays.
 */
export const OP_SOURCE = 0;
export const OP_LTI = 1; // controllable canonical: ẋ_j = x_(j+1), ẋ_(n−1) = b·u − Σ a_j x_j, y = Σ c_j x_j + d·u
export const OP_SUM = 2;
export const OP_DELAY = 3;
export const OP_SAT = 4;
export const OP_DEADZONE = 5;
export const OP_RATE = 6;
export const OP_PID = 7;

export const AW_OFF = 0;
export const AW_BACK = 1;
export const AW_CONDITIONAL = 2;

export class SimNode {
  op = 0;
  /** Index of the diagram block this node belongs to (for messages and figures). */
  block = -1;
  /** This node's own index (its signal). */
  self = -1;
  in0 = -1;
  ins: Int32Array = new Int32Array(0);
  signs: Float64Array = new Float64Array(0);
  feedthrough = false;
  // states
  so = 0;
  ns = 0;
  a: Float64Array = new Float64Array(0);
  c: Float64Array = new Float64Array(0);
  d = 0;
  /** Input gain of the last canonical state (scales the states to the output's size). */
  b = 1;
  // limits (saturation, dead zone, PID output) and rates
  lo = -Infinity;
  hi = Infinity;
  rising = Infinity;
  falling = Infinity;
  mode = 0;
  frozen = false;
  go = 0;
  ng = 0;
  // PID: v = kp·e + I + kdTf·(e − z); İ = ki·e (+ anti-windup); ż = (e − z)/tf
  kp = 0;
  ki = 0;
  kdTf = 0;
  tf = 1;
  tt = 1;
  aw = AW_OFF;
  hasD = false;
  v = 0;
  // source, dead time
  src: SourceParams | null = null;
  delay = 0;
  hist: History | null = null;
}

export class Engine {
  readonly nodes: SimNode[];
  readonly order: Int32Array;
  readonly sig: Float64Array;
  readonly nStates: number;
  readonly stateNodes: SimNode[];
  readonly guardNodes: SimNode[];
  readonly rateNodes: SimNode[];
  readonly delayNodes: SimNode[];
  readonly guards: Float64Array;
  /** Size of the signal behind each guard (1 + |u|): a guard fires only below −1e-11·scale (round-off). */
  readonly guardScale: Float64Array;
  readonly udot: Float64Array;
  /** State index → node owning it (messages). */
  readonly stateOwner: Int32Array;
  /** A time inside the segment being integrated (picks the side of source and history jumps). */
  piece = 0;
  /** Step of the central difference for signal slopes (rate limiter guards). */
  fdStep = 1e-6;
  evaluations = 0;
  private readonly xs: Float64Array;
  private readonly dxs: Float64Array;
  private readonly up: Float64Array;

  constructor(nodes: SimNode[], order: Int32Array, nStates: number) {
    this.nodes = nodes;
    this.order = order;
    this.sig = new Float64Array(nodes.length);
    this.nStates = nStates;
    this.stateNodes = nodes.filter((n) => n.ns > 0);
    // guards in topological order, so that mode selection runs upstream first
    const ordered = Array.from(order, (k) => nodes[k]);
    this.guardNodes = ordered.filter((n) => n.ng > 0);
    this.rateNodes = this.guardNodes.filter((n) => n.op === OP_RATE);
    this.delayNodes = nodes.filter((n) => n.op === OP_DELAY && n.delay > 0);
    let ng = 0;
    for (const n of this.guardNodes) {
      n.go = ng;
      ng += n.ng;
    }
    this.guards = new Float64Array(ng);
    this.guardScale = new Float64Array(ng).fill(1);
    this.udot = new Float64Array(nodes.length);
    this.stateOwner = new Int32Array(nStates).fill(-1);
    for (const n of this.stateNodes) for (let j = 0; j < n.ns; j++) this.stateOwner[n.so + j] = n.block;
    this.xs = new Float64Array(nStates);
    this.dxs = new Float64Array(nStates);
    this.up = new Float64Array(nodes.length);
  }

  /** Every signal at time t from the states x (modes frozen). */
  evalNet(t: number, x: ArrayLike<number>): void {
    const sig = this.sig;
    const nodes = this.nodes;
    const order = this.order;
    const piece = this.piece;
    for (let i = 0; i < order.length; i++) {
      const k = order[i];
      const nd = nodes[k];
      let y = 0;
      switch (nd.op) {
        case OP_SOURCE:
          y = sourceValue(nd.src!, t, piece);
          break;
        case OP_LTI: {
          const so = nd.so;
          const c = nd.c;
          for (let j = 0; j < nd.ns; j++) y += c[j] * x[so + j];
          if (nd.d !== 0) y += nd.d * sig[nd.in0];
          break;
        }
        case OP_SUM: {
          const ins = nd.ins;
          const signs = nd.signs;
          for (let j = 0; j < ins.length; j++) y += signs[j] * sig[ins[j]];
          break;
        }
        case OP_DELAY:
          y = nd.delay === 0 ? sig[nd.in0] : nd.hist!.value(t - nd.delay, piece - nd.delay);
          break;
        case OP_SAT: {
          const u = sig[nd.in0];
          y = nd.mode === 0 ? u : nd.mode > 0 ? nd.hi : nd.lo;
          break;
        }
        case OP_DEADZONE: {
          const u = sig[nd.in0];
          y = nd.mode === 0 ? 0 : nd.mode > 0 ? u - nd.hi : u - nd.lo;
          break;
        }
        case OP_RATE:
          y = nd.mode === 0 ? sig[nd.in0] : x[nd.so];
          break;
        case OP_PID: {
          const e = sig[nd.in0];
          let v = nd.kp * e + x[nd.so];
          if (nd.hasD) v += nd.kdTf * (e - x[nd.so + 1]);
          nd.v = v;
          y = nd.mode === 0 ? v : nd.mode > 0 ? nd.hi : nd.lo;
          break;
        }
      }
      sig[k] = y;
    }
  }

  /** ẋ = f(t, x) into dx. */
  rhs(t: number, x: ArrayLike<number>, dx: { [i: number]: number }): void {
    this.evaluations++;
    this.evalNet(t, x);
    const sig = this.sig;
    const sn = this.stateNodes;
    for (let i = 0; i < sn.length; i++) {
      const nd = sn[i];
      const so = nd.so;
      switch (nd.op) {
        case OP_LTI: {
          const n = nd.ns;
          const a = nd.a;
          let acc = nd.b * sig[nd.in0];
          for (let j = 0; j < n; j++) acc -= a[j] * x[so + j];
          for (let j = 0; j < n - 1; j++) dx[so + j] = x[so + j + 1];
          dx[so + n - 1] = acc;
          break;
        }
        case OP_RATE:
          dx[so] = nd.mode === 0 ? 0 : nd.mode > 0 ? nd.rising : -nd.falling;
          break;
        case OP_PID: {
          const e = sig[nd.in0];
          let di = nd.ki * e;
          if (nd.aw === AW_BACK) di += (sig[nd.self] - nd.v) / nd.tt;
          else if (nd.aw === AW_CONDITIONAL && nd.frozen) di = 0;
          dx[so] = di;
          if (nd.hasD) dx[so + 1] = (e - x[so + 1]) / nd.tf;
          break;
        }
        default:
          // a dummy state (a model without states still needs one for the integrator)
          dx[so] = 0;
      }
    }
  }

  /** Slopes of the rate limiters' inputs at (t, x) by a central difference along ẋ. */
  private inputSlopes(t: number, x: ArrayLike<number>): void {
    const n = this.nStates;
    const xs = this.xs;
    const dx = this.dxs;
    this.rhs(t, x, dx);
    const h = this.fdStep;
    for (let i = 0; i < n; i++) xs[i] = x[i] + h * dx[i];
    this.evalNet(t + h, xs);
    for (const nd of this.rateNodes) this.up[nd.in0] = this.sig[nd.in0];
    for (let i = 0; i < n; i++) xs[i] = x[i] - h * dx[i];
    this.evalNet(t - h, xs);
    for (const nd of this.rateNodes) this.udot[nd.in0] = (this.up[nd.in0] - this.sig[nd.in0]) / (2 * h);
    this.evalNet(t, x);
  }

  /** Guard values at (t, x): evaluates the network (and input slopes where a rate limiter tracks). */
  computeGuards(t: number, x: ArrayLike<number>, forceSlopes = false): Float64Array {
    let needSlopes = forceSlopes && this.rateNodes.length > 0;
    for (const nd of this.rateNodes) if (nd.mode === 0) needSlopes = true;
    if (needSlopes) this.inputSlopes(t, x);
    else this.evalNet(t, x);
    const g = this.guards;
    const sig = this.sig;
    for (const nd of this.guardNodes) {
      const o = nd.go;
      switch (nd.op) {
        case OP_SAT:
        case OP_DEADZONE:
        case OP_PID: {
          const u = nd.op === OP_PID ? nd.v : sig[nd.in0];
          this.guardScale[o] = this.guardScale[o + 1] = 1 + Math.abs(u);
          if (nd.mode === 0) {
            g[o] = u - nd.lo;
            g[o + 1] = nd.hi - u;
          } else {
            g[o] = nd.mode > 0 ? u - nd.hi : nd.lo - u;
            g[o + 1] = Infinity;
          }
          if (nd.op === OP_PID && nd.ng > 2) {
            if (nd.mode === 0) g[o + 2] = Infinity;
            else {
              const p = nd.mode * Math.sign(nd.ki) * sig[nd.in0];
              g[o + 2] = nd.frozen ? p : -p;
            }
          }
          break;
        }
        case OP_RATE: {
          const u = sig[nd.in0];
          this.guardScale[o] = this.guardScale[o + 1] = 1 + Math.abs(u);
          if (nd.mode === 0) {
            const s = this.udot[nd.in0];
            g[o] = nd.rising - s;
            g[o + 1] = s + nd.falling;
          } else {
            const r = x[nd.so];
            g[o] = nd.mode > 0 ? u - r : r - u;
            g[o + 1] = Infinity;
          }
          break;
        }
      }
    }
    return g;
  }
}
