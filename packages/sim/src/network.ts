import type { SimNode } from './ops/node.ts';

/**
 * The run-time network of a diagram: one node per signal, evaluated in topological order of the
 * direct-feedthrough nodes, states in one vector. Nonlinear nodes hold a mode that is frozen
 * while a segment is integrated (so the right-hand side is smooth inside it); guard functions
 * say when a mode stops being valid (a guard turning negative is an event). What each node does
 * is its operation's business (ops/*.ts); this class only runs them in order.
 */
export class Network {
  readonly nodes: SimNode[];
  readonly order: Int32Array;
  readonly sig: Float64Array;
  readonly nStates: number;
  readonly stateNodes: SimNode[];
  /** Nodes with guards, in topological order (mode selection runs upstream first). */
  readonly guardNodes: SimNode[];
  readonly slopeNodes: SimNode[];
  /** Dead times with a positive delay. */
  readonly delayNodes: SimNode[];
  /** Nodes whose output is exogenous in the exact engine (sources, dead times), by slot. */
  readonly exoNodes: SimNode[];
  readonly guards: Float64Array;
  /** Size of the signal behind each guard (1 + |u|): a guard fires only below −1e-11·scale (round-off). */
  readonly guardScale: Float64Array;
  /** Input slopes (read by guards that need them). */
  readonly udot: Float64Array;
  /** State index → block owning it (messages). */
  readonly stateOwner: Int32Array;
  /** A time inside the segment being integrated (picks the side of source and history jumps). */
  piece = 0;
  /** Step of the central difference for signal slopes (rate limiter guards). */
  fdStep = 1e-6;
  evaluations = 0;
  /** When set, exogenous nodes output exo[nd.exo] instead of their waveform or history (exact engine's probing). */
  exo: Float64Array | null = null;
  private readonly xs: Float64Array;
  private readonly dxs: Float64Array;
  private readonly up: Float64Array;

  constructor(nodes: SimNode[], order: Int32Array, nStates: number) {
    this.nodes = nodes;
    this.order = order;
    this.sig = new Float64Array(nodes.length);
    this.nStates = nStates;
    this.stateNodes = nodes.filter((n) => n.ns > 0);
    const ordered = Array.from(order, (k) => nodes[k]);
    this.guardNodes = ordered.filter((n) => n.ng > 0);
    this.slopeNodes = this.guardNodes.filter((n) => n.op.readsSlope);
    this.delayNodes = nodes.filter((n) => n.delay > 0);
    this.exoNodes = nodes.filter((n) => n.op.exoSize(n) > 0);
    this.exoNodes.forEach((n, i) => (n.exo = i));
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
    const exo = this.exo;
    if (exo === null) {
      for (let i = 0; i < order.length; i++) {
        const k = order[i];
        const nd = nodes[k];
        sig[k] = nd.op.output(nd, t, x, sig, piece);
      }
      return;
    }
    for (let i = 0; i < order.length; i++) {
      const k = order[i];
      const nd = nodes[k];
      sig[k] = nd.exo >= 0 ? exo[nd.exo] : nd.op.output(nd, t, x, sig, piece);
    }
  }

  /** ẋ = f(t, x) into dx (evaluates the network first). */
  rhs(t: number, x: ArrayLike<number>, dx: { [i: number]: number }): void {
    this.evaluations++;
    this.evalNet(t, x);
    this.derivatives(x, dx);
  }

  /** ẋ from the signals already evaluated. */
  derivatives(x: ArrayLike<number>, dx: { [i: number]: number }): void {
    const sig = this.sig;
    const sn = this.stateNodes;
    for (let i = 0; i < sn.length; i++) {
      const nd = sn[i];
      nd.op.derivative(nd, x, sig, dx);
    }
  }

  /** Slopes of the inputs of slope-reading nodes at (t, x) by a central difference along ẋ. */
  private inputSlopes(t: number, x: ArrayLike<number>): void {
    const n = this.nStates;
    const xs = this.xs;
    const dx = this.dxs;
    this.rhs(t, x, dx);
    const h = this.fdStep;
    for (let i = 0; i < n; i++) xs[i] = x[i] + h * dx[i];
    this.evalNet(t + h, xs);
    for (const nd of this.slopeNodes) this.up[nd.in0] = this.sig[nd.in0];
    for (let i = 0; i < n; i++) xs[i] = x[i] - h * dx[i];
    this.evalNet(t - h, xs);
    for (const nd of this.slopeNodes) this.udot[nd.in0] = (this.up[nd.in0] - this.sig[nd.in0]) / (2 * h);
    this.evalNet(t, x);
  }

  /** Guard values at (t, x): evaluates the network (and input slopes where a guard reads them, or all when `forceSlopes`). */
  computeGuards(t: number, x: ArrayLike<number>, forceSlopes = false): Float64Array {
    let needSlopes = forceSlopes && this.slopeNodes.length > 0;
    if (!needSlopes) for (const nd of this.slopeNodes) if (nd.op.needsSlope(nd)) needSlopes = true;
    if (needSlopes) this.inputSlopes(t, x);
    else this.evalNet(t, x);
    this.guardsFromSignals(x);
    return this.guards;
  }

  /** Guard values from the signals (and slopes) already in place. */
  guardsFromSignals(x: ArrayLike<number>): void {
    const gn = this.guardNodes;
    for (let i = 0; i < gn.length; i++) {
      const nd = gn[i];
      nd.op.guards(nd, x, this.sig, this.udot, this.guards, this.guardScale);
    }
  }
}
