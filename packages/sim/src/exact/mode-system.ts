import type { Network } from '../network.ts';
import { mulRect, slab } from './dense.ts';
import { type Ladder, ladderFor } from './ladder.ts';

/**
 * Where each quantity sits in the exact engine's state z = [x | 1 | exosystem blocks]: the
 * diagram's states, a constant 1 (limits, offsets and slew rates enter through it), then one
 * block per exogenous node (a source's waveform generator, a dead time's window polynomial).
 */
export interface Layout {
  N: number;
  n: number;
  one: number;
  /** Block offset of each exogenous node, by its slot. */
  at: Int32Array;
}

export function layoutOf(net: Network): Layout {
  const n = net.nStates;
  const at = new Int32Array(net.exoNodes.length);
  let N = n + 1;
  net.exoNodes.forEach((nd, i) => {
    at[i] = N;
    N += nd.op.exoSize(nd);
  });
  return { N, n, one: n, at };
}

/** Which signals the engine reads at every step end and at grid points (node indices). */
export interface Watch {
  step: number[];
  grid: number[];
}

/**
 * One mode of the piecewise-affine model, as matrices over z (row-major): within a mode every
 * operation is affine, so ż = M·z and every signal, state derivative and guard is a row times z.
 * The rows are found by evaluating the network itself at unit vectors of z (with the exogenous
 * nodes' outputs set to the probe), so no operation needs a second, hand-written linear form:
 * column k of an affine map f is f(e_k) − f(0), and the column of the constant 1 is f(0).
 */
export class ModeSystem {
  readonly N: number;
  /** ż = M·z. */
  readonly M: Float64Array;
  /** Every signal: sig = S·z (node-major rows), and its slope S1·z. */
  readonly S: Float64Array;
  readonly S1: Float64Array;
  /** Guards G·z and their slopes Gp·z (inactive guards: zero rows, never fire). */
  readonly G: Float64Array;
  readonly Gp: Float64Array;
  readonly active: Uint8Array;
  /** Second derivative rows of the dead times' inputs (by delay node). */
  readonly S2delay: Float64Array[];
  readonly ladder: Ladder;
  /** Φ = e^(M·h0). */
  readonly Phi: Float64Array;
  /** e^(M·h0/2), for the mid-step guard check. */
  readonly Half: Float64Array;
  /**
   * What a step reads at its end, as rows times z: guards (ng), their slopes (ng), each dead
   * time's input with its first and second derivative (3 per dead time), then `watch.step`
   * signals. R for any z. A regular step's end state is needed only in its first n entries (the
   * exosystems are refilled), so it takes one product by Step = [Φ's state rows; R·Φ]: n + rows
   * rows, the end state then what R reads at the step end (one pass over z instead of two).
   */
  readonly R: Float64Array;
  readonly Step: Float64Array;
  readonly rows: number;
  /** The `watch.grid` signals (a grid point at a step end is read from the step rows instead). */
  readonly Rg: Float64Array;
  private readonly RgOff: Float64Array[] = [];
  private readonly gridCount: number;

  constructor(net: Network, lay: Layout, h0: number, watch: Watch, minRungs = 1) {
    const { N, n, one } = lay;
    const nodes = net.nodes.length;
    const ng = net.guards.length;
    this.N = N;
    // every matrix of the mode in shared chunks (about forty separate arrays were a quarter of a mode's making)
    const take = slab();
    const S = take(nodes * N);
    // ż = M·z: the state rows (A) are filled from the network, the exosystems' rows by their generators
    const M = take(N * N);
    const A = M.subarray(0, n * N);
    const x = take(n);
    const dx = take(n);
    const u = take(net.exoNodes.length);
    const sig = net.sig;
    const firstOf = new Int32Array(N).fill(-1);
    lay.at.forEach((a, j) => (firstOf[a] = j));
    net.exo = u;
    try {
      // f(0): the constant column
      net.evalNet(0, x);
      net.derivatives(x, dx);
      const sig0 = take(nodes);
      sig0.set(sig);
      const dx0 = take(n);
      dx0.set(dx);
      for (let r = 0; r < nodes; r++) S[r * N + one] = sig0[r];
      for (let r = 0; r < n; r++) A[r * N + one] = dx0[r];
      for (let k = 0; k < N; k++) {
        if (k === one || (k > one && firstOf[k] < 0)) continue; // inner exosystem entries do not reach the network
        if (k < n) x[k] = 1;
        else u[firstOf[k]] = 1;
        net.evalNet(0, x);
        net.derivatives(x, dx);
        for (let r = 0; r < nodes; r++) S[r * N + k] = sig[r] - sig0[r];
        for (let r = 0; r < n; r++) A[r * N + k] = dx[r] - dx0[r];
        if (k < n) x[k] = 0;
        else u[firstOf[k]] = 0;
      }
      net.exoNodes.forEach((nd, j) => nd.op.exoGenerator(nd, M, N, lay.at[j], one));
      this.M = M;
      const S1 = take(nodes * N);
      mulRect(S, nodes, M, N, S1);
      this.S = S;
      this.S1 = S1;

      // guards: g(z) from the signals S·z and slopes S1·z at each unit vector (second pass, so
      // that operations reading values set during evaluation — a PID's unlimited output — see them)
      this.G = take(ng * N);
      this.active = new Uint8Array(ng);
      if (ng > 0) {
        const udot = net.udot;
        const slopeIn = net.slopeNodes.map((nd) => nd.in0);
        // net.guards at z = e_k (k = −1: at z = 0)
        const probe = (k: number): Float64Array => {
          if (k >= 0 && k < n) x[k] = 1;
          else if (k > one && firstOf[k] >= 0) u[firstOf[k]] = 1;
          net.evalNet(0, x);
          for (const i of slopeIn) udot[i] = S1[i * N + one] + (k >= 0 && k !== one ? S1[i * N + k] : 0);
          net.guardsFromSignals(x);
          if (k >= 0 && k < n) x[k] = 0;
          else if (k > one && firstOf[k] >= 0) u[firstOf[k]] = 0;
          return net.guards;
        };
        const g0 = take(ng);
        g0.set(probe(-1));
        for (let i = 0; i < ng; i++) this.active[i] = Number.isFinite(g0[i]) ? 1 : 0;
        for (let i = 0; i < ng; i++) if (this.active[i]) this.G[i * N + one] = g0[i];
        for (let k = 0; k < N; k++) {
          if (k === one) continue;
          const gk = probe(k);
          for (let i = 0; i < ng; i++) if (this.active[i]) this.G[i * N + k] = gk[i] - g0[i];
        }
      }
      this.Gp = take(ng * N);
      mulRect(this.G, ng, M, N, this.Gp);
      this.S2delay = net.delayNodes.map((nd) => {
        const row = take(N);
        mulRect(S1.subarray(nd.in0 * N, nd.in0 * N + N), 1, M, N, row);
        return row;
      });
    } finally {
      net.exo = null;
    }
    this.ladder = ladderFor(this.M, N, h0, minRungs);
    this.Phi = take(N * N);
    this.Phi.set(this.ladder.E[0]);
    for (let i = 0; i < N; i++) this.Phi[i * N + i] += 1;
    this.Half = take(N * N);
    this.Half.set(this.ladder.E[1]);
    for (let i = 0; i < N; i++) this.Half[i * N + i] += 1;

    const nd = net.delayNodes.length;
    this.rows = 2 * ng + 3 * nd + watch.step.length;
    const R = take(this.rows * N);
    R.set(this.G, 0);
    R.set(this.Gp, ng * N);
    net.delayNodes.forEach((d, j) => {
      const o = (2 * ng + 3 * j) * N;
      R.set(this.S.subarray(d.in0 * N, d.in0 * N + N), o);
      R.set(this.S1.subarray(d.in0 * N, d.in0 * N + N), o + N);
      R.set(this.S2delay[j], o + 2 * N);
    });
    watch.step.forEach((r, j) => R.set(this.S.subarray(r * N, r * N + N), (2 * ng + 3 * nd + j) * N));
    this.R = R;
    this.Step = take((n + this.rows) * N);
    this.Step.set(this.Phi.subarray(0, n * N));
    mulRect(R, this.rows, this.Phi, N, this.Step.subarray(n * N));
    this.Rg = take(watch.grid.length * N);
    watch.grid.forEach((r, j) => this.Rg.set(this.S.subarray(r * N, r * N + N), j * N));
    this.gridCount = watch.grid.length;
  }

  /** The grid rows times e^(M·h0·j/q) (0 < j < q, q a power of two): the rungs whose bits are set, made once per offset. */
  gridRowsAt(j: number, q: number): Float64Array {
    let X = this.RgOff[j];
    if (X) return X;
    const N = this.N;
    const rows = this.gridCount;
    X = Float64Array.from(this.Rg);
    const T = new Float64Array(rows * N);
    // j/q = Σ bits 2^(i − J) with q = 2^J: bit i is rung J − i
    const J = Math.round(Math.log2(q));
    for (let i = 0; i < J; i++) {
      if (((j >> i) & 1) === 0) continue;
      mulRect(X, rows, this.ladder.E[J - i], N, T);
      for (let r = 0; r < rows * N; r++) X[r] += T[r];
    }
    this.RgOff[j] = X;
    return X;
  }
}
