import type { CompiledBlock } from '../compile.ts';
import { HermiteHistory } from '../exact/hermite-history.ts';
import { defineOp, type SimNode } from './node.ts';
import type { BuildContext } from './registry-types.ts';

/**
 * Dead time: y(t) = u(t − T), read from the recorded history of u (history.ts); before t = 0
 * the system is at rest. A dead time of 0 passes its input through (and so is feedthrough).
 *
 * In the exact engine a step [t, t + h] is never longer than the shortest dead time, so the
 * delayed input over it is already recorded: it is one polynomial of degree 5, the interpolant of
 * the history at the six Chebyshev–Lobatto points of the window [t − T, t − T + h]. It enters the
 * exact solution as a chain exosystem holding that polynomial's value and first five derivatives
 * (the fifth's derivative is 0), so the step integrates it exactly; the dead time's output is the
 * first entry. A signal that is a polynomial of degree ≤ 5 over the window is reproduced exactly;
 * otherwise the error is of order h⁶ (interpolation at Chebyshev–Lobatto points). Windows never
 * straddle a recorded jump or kink: those are breakpoints carried forward through the dead time
 * (up to four times), and a window is the step's own.
 */
export const WINDOW_TERMS = 6;

/** Lobatto nodes on [0, 1] and the map from values at them to Taylor coefficients k!·a_k of the interpolant at 0. */
const NODES = Float64Array.from({ length: WINDOW_TERMS }, (_, i) => (1 - Math.cos((Math.PI * i) / (WINDOW_TERMS - 1))) / 2);
NODES[0] = 0;
NODES[WINDOW_TERMS - 1] = 1;
const TAYLOR = taylorMap(NODES);

function taylorMap(c: Float64Array): Float64Array {
  const n = c.length;
  // invert the Vandermonde matrix V[i][k] = c_i^k by Gauss–Jordan (n = 6: exact enough, done once)
  const a = new Float64Array(n * 2 * n);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < n; k++) a[i * 2 * n + k] = c[i] ** k;
    a[i * 2 * n + n + i] = 1;
  }
  for (let col = 0; col < n; col++) {
    let piv = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r * 2 * n + col]) > Math.abs(a[piv * 2 * n + col])) piv = r;
    for (let k = 0; k < 2 * n; k++) [a[col * 2 * n + k], a[piv * 2 * n + k]] = [a[piv * 2 * n + k], a[col * 2 * n + k]];
    const d = a[col * 2 * n + col];
    for (let k = 0; k < 2 * n; k++) a[col * 2 * n + k] /= d;
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const f = a[r * 2 * n + col];
      if (f !== 0) for (let k = 0; k < 2 * n; k++) a[r * 2 * n + k] -= f * a[col * 2 * n + k];
    }
  }
  // row k of V⁻¹ gives a_k; the k-th derivative at 0 is k!·a_k
  const out = new Float64Array(n * n);
  let fact = 1;
  for (let k = 0; k < n; k++) {
    if (k > 0) fact *= k;
    for (let i = 0; i < n; i++) out[k * n + i] = fact * a[k * 2 * n + n + i];
  }
  return out;
}

/** The map below is written out for six terms: changing WINDOW_TERMS fails to compile here. */
const SIX_TERMS: 6 = WINDOW_TERMS;
const times = new Float64Array(SIX_TERMS);
const values = new Float64Array(WINDOW_TERMS);
/** TAYLOR with row k divided by h^k, for the last step length asked (almost every step is the lattice step). */
const scaled = new Float64Array(WINDOW_TERMS * WINDOW_TERMS);
let scaledFor = NaN;

function scaledTaylor(h: number): Float64Array {
  if (h !== scaledFor) {
    let scale = 1;
    for (let k = 0; k < WINDOW_TERMS; k++) {
      for (let i = 0; i < WINDOW_TERMS; i++) scaled[k * WINDOW_TERMS + i] = TAYLOR[k * WINDOW_TERMS + i] / scale;
      scale *= h;
    }
    scaledFor = h;
  }
  return scaled;
}

/**
 * On a lattice step the window [a, a + h] lies in two whole recorded steps of length h, its
 * nodes at the same places in them every step: the six Taylor terms are then one fixed 6 × 12
 * map of the two pieces' coefficients (the interpolant at the nodes, as `sample` evaluates it,
 * folded into the Taylor map), kept per step length and phase — a few per run.
 */
const PAIR_COLS = 2 * WINDOW_TERMS;
interface PairMap {
  h: number;
  phase: number;
  /** null: a node falls on the pieces' joint, where `sample` decides its side by the bias (the general path). */
  G: Float64Array | null;
}
const pairMaps: PairMap[] = [];

/** The map for the step length in `when` and the phase `latticePair` found (null: a node on the pieces' joint). */
function pairMap(when: Float64Array, hist: HermiteHistory): Float64Array | null {
  const h = when[1];
  const phase = hist.phase;
  for (const m of pairMaps) if (m.h === h && Math.abs(m.phase - phase) <= 1e-11) return m.G;
  const onJoint = NODES.some((x) => Math.abs(phase + x - 1) <= 1e-6);
  const G = onJoint ? null : new Float64Array(WINDOW_TERMS * PAIR_COLS);
  const W = scaledTaylor(h);
  for (let i = 0; G !== null && i < WINDOW_TERMS; i++) {
    const u = phase + NODES[i];
    const col = u < 1 ? 0 : WINDOW_TERMS;
    const sv = u < 1 ? u : u - 1;
    let pw = 1;
    for (let j = 0; j < WINDOW_TERMS; j++, pw *= sv) {
      for (let k = 0; k < WINDOW_TERMS; k++) G[k * PAIR_COLS + col + j] += W[k * WINDOW_TERMS + i] * pw;
    }
  }
  if (pairMaps.length >= 8) pairMaps.pop();
  pairMaps.unshift({ h, phase, G });
  return G;
}

/**
 * The window's six Taylor terms into z[at …] by the fixed map of the lattice pair p; false when
 * that does not apply. The step is read from `when` ([t, h, piece]): doubles passed to a call
 * are boxed, and this runs twice a step for every dead time.
 */
function fromPair(hist: HermiteHistory, when: Float64Array, delay: number, z: Float64Array, at: number): boolean {
  const p = hist.latticePair(when, delay);
  if (p < 0) return false;
  const G = pairMap(when, hist);
  if (G === null) return false;
  windowTerms(G, PAIR_COLS, hist.coefficients, p * WINDOW_TERMS, z, at);
  return true;
}

/**
 * z[at + k] = Σ_j M[k·cols + j]·v[from + j], k = 0 … 5: one pass over v into six independent
 * sums, not one chain of 36 or 72 additions (the window's hot loop: 12 % of a linear run as a
 * chain; SIX_TERMS keeps the six in step).
 */
function windowTerms(M: Float64Array, cols: number, v: Float64Array, from: number, z: Float64Array, at: number): void {
  let c0 = 0;
  let c1 = 0;
  let c2 = 0;
  let c3 = 0;
  let c4 = 0;
  let c5 = 0;
  for (let j = 0; j < cols; j++) {
    const x = v[from + j];
    c0 += M[j] * x;
    c1 += M[cols + j] * x;
    c2 += M[2 * cols + j] * x;
    c3 += M[3 * cols + j] * x;
    c4 += M[4 * cols + j] * x;
    c5 += M[5 * cols + j] * x;
  }
  z[at] = c0;
  z[at + 1] = c1;
  z[at + 2] = c2;
  z[at + 3] = c3;
  z[at + 4] = c4;
  z[at + 5] = c5;
}

export const delayOp = defineOp({
  name: 'dead-time',
  output: (nd, t, _x, sig, piece) => (nd.delay === 0 ? sig[nd.in0] : nd.hist!.value(t - nd.delay, piece - nd.delay)),
  exoSize: (nd) => (nd.delay > 0 ? WINDOW_TERMS : 0),
  exoGenerator: (_nd, M, N, at) => {
    for (let k = 0; k + 1 < WINDOW_TERMS; k++) M[(at + k) * N + at + k + 1] = 1;
  },
  exoState: (nd, when, z, at) => {
    const h = when[1];
    const a = when[0] - nd.delay;
    const hist = nd.hist!;
    if (hist instanceof HermiteHistory && fromPair(hist, when, nd.delay, z, at)) return;
    const piece = when[2];
    for (let i = 0; i < WINDOW_TERMS; i++) times[i] = a + NODES[i] * h;
    hist.sample(times, piece - nd.delay, values, 0);
    windowTerms(scaledTaylor(h), WINDOW_TERMS, values, 0, z, at);
  },
  steady: (nd, t) => nd.delay === 0 || nd.hist!.steadyOver(t - nd.delay),
});

/** The dead-time node of block cb (its input: the block's input); returns it so a linear part can follow. */
export function buildDelay(cb: CompiledBlock, delay: number, ctx: BuildContext): SimNode {
  const nd = ctx.add(delayOp, cb);
  nd.delay = delay;
  nd.feedthrough = delay === 0;
  ctx.wire(nd, cb.inputs);
  return nd;
}
