import { type Complex, InputError, cx, poly } from '@loopwright/lti';
import { type SignalGraph, relevantNodes } from './points.ts';

/**
 * The transmission of a prepared signal graph evaluated at s = jω by solving the linear
 * diagram there, every dead time kept exact as e^(−jωT) — including dead times inside other
 * loops, which the polynomial reduction must replace by Padé approximants. The node equations
 *   y_v = G_v(jω) · Σ_e w_e · y_from(e)      (the input node: y = 1; other sources: y = 0)
 * form the complex linear system (I − G·W) y = e_input; only the nodes on some path from the
 * input to the output take part. Chains of single-input nodes are carried as products (see
 * chainPlan), and the system left over (input and junctions) is solved by Gaussian elimination
 * with partial pivoting.
 */
export interface ExactEvaluator {
  /** The transmission output/input at s = jω. */
  (omega: number): Complex;
  /** Sum of the dead times on the nodes that take part (s). */
  readonly delaySum: number;
  /** Dead times inside loops among those nodes (the ones a polynomial reduction approximates). */
  readonly loopDelays: number;
}

/** Even and odd parts of a polynomial for p(jω) = E(−ω²) + jω·O(−ω²) (Horner in ω², no allocation). */
function split(p: readonly number[]): { even: number[]; odd: number[] } {
  const even: number[] = [];
  const odd: number[] = [];
  for (let i = 0; i < p.length; i++) (i % 2 ? odd : even).push(p[i]);
  return { even, odd };
}

const horner = (c: readonly number[], x: number) => {
  let v = 0;
  for (let i = c.length - 1; i >= 0; i--) v = v * x + c[i];
  return v;
};

export function exactEvaluator(g: SignalGraph): ExactEvaluator {
  const nodes = relevantNodes(g).flatMap((keep, v) => (keep ? [v] : []));
  const index = new Map<number, number>();
  nodes.forEach((v, i) => index.set(v, i));
  const m = nodes.length;
  const out = index.get(g.output);
  const inp = index.get(g.input);
  if (out === undefined || inp === undefined) {
    const zero = ((_w: number) => cx(0)) as ExactEvaluator;
    return Object.assign(zero, { delaySum: 0, loopDelays: 0 });
  }
  const gains = nodes.map((v) => ({
    num: split(poly.trim(g.num[v])),
    den: split(poly.trim(g.den[v])),
    delay: g.delay[v],
    source: g.kinds[v] === 'source',
  }));
  // W[i][j]: weight from node j into node i (parallel branches merged).
  const W = Array.from({ length: m }, () => new Float64Array(m));
  for (const b of g.branches) {
    if (b.to < 0) continue;
    const i = index.get(b.to);
    const j = index.get(b.from);
    if (i === undefined || j === undefined) continue;
    W[i][j] += b.weight;
  }
  let delaySum = 0;
  for (const x of gains) delaySum += x.delay;
  const loopDelays = loopDelaysOf(
    W,
    gains.map((x) => x.delay),
  );
  const plan = chainPlan(W, inp, out);
  const nk = plan.kept.length;
  const Are = Array.from({ length: nk }, () => new Float64Array(nk));
  const Aim = Array.from({ length: nk }, () => new Float64Array(nk));
  const bre = new Float64Array(nk);
  const bim = new Float64Array(nk);
  const gre = new Float64Array(m);
  const gim = new Float64Array(m);
  // Chain coefficients: y_v = c_v · y_root(v) (c = 1 on kept nodes).
  const cre = new Float64Array(m).fill(1);
  const cim = new Float64Array(m);
  // The output itself kept, or read through its chain's coefficient.
  const outChained = plan.outRoot >= 0 && plan.kept[plan.outRoot] !== out;
  const evaluate = (w: number): Complex => {
    if (!(w >= 0) || !Number.isFinite(w)) throw new InputError(`frequency ${w} rad/s: must be finite and ≥ 0`, { field: 'omega' });
    if (plan.outRoot < 0) return cx(0);
    const x = -w * w;
    for (let i = 0; i < m; i++) {
      const q = gains[i];
      if (q.source) {
        gre[i] = 0;
        gim[i] = 0;
        continue;
      }
      const nre = horner(q.num.even, x);
      const nim = w * horner(q.num.odd, x);
      const dre = horner(q.den.even, x);
      const dim = w * horner(q.den.odd, x);
      const dd = dre * dre + dim * dim;
      let re = (nre * dre + nim * dim) / dd;
      let im = (nim * dre - nre * dim) / dd;
      if (q.delay > 0) {
        const c = Math.cos(w * q.delay);
        const s = Math.sin(w * q.delay);
        const r2 = re * c + im * s;
        im = im * c - re * s;
        re = r2;
      }
      gre[i] = re;
      gim[i] = im;
    }
    // Chained nodes, each after its predecessor: c_v = G_v · w_v · c_pred.
    for (const v of plan.order) {
      const u = plan.pred[v];
      const wv = plan.weight[v];
      const ar = gre[v] * wv;
      const ai = gim[v] * wv;
      cre[v] = ar * cre[u] - ai * cim[u];
      cim[v] = ar * cim[u] + ai * cre[u];
    }
    // The kept nodes' system (I − G·W·C) y = e_input, each branch from a chained node through its coefficient.
    for (let r = 0; r < nk; r++) {
      const ar = Are[r];
      const ai = Aim[r];
      ar.fill(0);
      ai.fill(0);
      const v = plan.kept[r];
      for (const { from, weight, root } of plan.inputs[r]) {
        // −G_v · weight · c_from into column root
        const pr = weight * cre[from];
        const pi = weight * cim[from];
        ar[root] -= gre[v] * pr - gim[v] * pi;
        ai[root] -= gre[v] * pi + gim[v] * pr;
      }
      ar[r] += 1;
      bre[r] = v === inp ? 1 : 0;
      bim[r] = 0;
    }
    const y = solveFor(Are, Aim, bre, bim, nk, plan.outRoot, w);
    const v = outChained ? cx(y.re * cre[out] - y.im * cim[out], y.re * cim[out] + y.im * cre[out]) : y;
    // A chain's product may overflow where pivoting over every node would not (gains near 1e308):
    // then the whole system is solved.
    return Number.isFinite(v.re) && Number.isFinite(v.im) ? v : solveWhole(w);
  };
  /** The system over every node, by elimination with partial pivoting (gre, gim as evaluate left them). */
  let whole: { Are: Float64Array[]; Aim: Float64Array[]; bre: Float64Array; bim: Float64Array } | undefined;
  const solveWhole = (w: number): Complex => {
    whole ??= {
      Are: Array.from({ length: m }, () => new Float64Array(m)),
      Aim: Array.from({ length: m }, () => new Float64Array(m)),
      bre: new Float64Array(m),
      bim: new Float64Array(m),
    };
    const { Are, Aim, bre, bim } = whole;
    for (let i = 0; i < m; i++) {
      const ar = Are[i];
      const ai = Aim[i];
      const wi = W[i];
      for (let j = 0; j < m; j++) {
        ar[j] = -gre[i] * wi[j];
        ai[j] = -gim[i] * wi[j];
      }
      ar[i] += 1;
      bre[i] = i === inp ? 1 : 0;
      bim[i] = 0;
    }
    return solveFor(Are, Aim, bre, bim, m, out, w);
  };
  return Object.assign(evaluate, { delaySum, loopDelays }) as ExactEvaluator;
}

/**
 * Which nodes the solve keeps. A node other than the input with one incoming branch, from another
 * node, is y_v = G_v·w·y_u: it is carried as a coefficient on the node its chain starts from
 * (products only, no division), so the complex system holds only the input, the junctions (two or
 * more incoming branches) and one node of any loop made of chained nodes alone — two or three
 * unknowns for a cascade instead of one per block. A node with no incoming branch (a source, or
 * one cut off) is zero.
 */
interface ChainPlan {
  /** Kept nodes (indices into the relevant nodes), in system order. */
  kept: number[];
  /** Chained nodes in evaluation order, each after its predecessor. */
  order: number[];
  pred: Int32Array;
  weight: Float64Array;
  /** Per kept node: its incoming branches, each from a node (kept or chained) whose chain starts at kept node `root` (system index). */
  inputs: { from: number; weight: number; root: number }[][];
  /** System index of the kept node the output's chain starts from; −1 when the output is zero. */
  outRoot: number;
}

function chainPlan(W: readonly Float64Array[], inp: number, out: number): ChainPlan {
  const m = W.length;
  const pred = new Int32Array(m).fill(-1);
  const weight = new Float64Array(m);
  // 0: undecided, 1: kept, 2: chained, 3: zero
  const kind = new Uint8Array(m);
  for (let v = 0; v < m; v++) {
    let count = 0;
    let from = -1;
    for (let j = 0; j < m; j++) {
      if (W[v][j] === 0) continue;
      count++;
      from = j;
    }
    if (v === inp || count > 1 || (count === 1 && from === v)) kind[v] = 1;
    else if (count === 0) kind[v] = 3;
    else {
      kind[v] = 2;
      pred[v] = from;
      weight[v] = W[v][from];
    }
  }
  // Roots: follow predecessors to a kept or zero node; a loop of chained nodes keeps its first node met again.
  const root = new Int32Array(m).fill(-2); // node index of the chain's start, −1: zero
  const order: number[] = [];
  const state = new Uint8Array(m); // 1: on the current path, 2: done
  for (let v0 = 0; v0 < m; v0++) {
    const path: number[] = [];
    let v = v0;
    while (state[v] === 0 && kind[v] === 2) {
      state[v] = 1;
      path.push(v);
      v = pred[v];
      if (state[v] === 1) {
        kind[v] = 1; // a loop of chained nodes: keep this one
        break;
      }
    }
    let r: number;
    if (kind[v] === 1) r = v;
    else if (kind[v] === 3) r = -1;
    else r = root[v]; // done earlier
    if (kind[v] !== 2) {
      state[v] = 2;
      root[v] = kind[v] === 3 ? -1 : v;
    }
    // The path's nodes, nearest the root first (each after its predecessor).
    for (let i = path.length - 1; i >= 0; i--) {
      const u = path[i];
      if (u === v) continue;
      state[u] = 2;
      root[u] = r;
      if (r >= 0) order.push(u);
    }
  }
  const kept: number[] = [];
  const pos = new Int32Array(m).fill(-1);
  for (let v = 0; v < m; v++) {
    if (kind[v] !== 1) continue;
    pos[v] = kept.length;
    kept.push(v);
  }
  const inputs = kept.map((v) => {
    const list: { from: number; weight: number; root: number }[] = [];
    for (let j = 0; j < m; j++) {
      if (W[v][j] === 0 || root[j] < 0) continue;
      list.push({ from: j, weight: W[v][j], root: pos[root[j]] });
    }
    return list;
  });
  return { kept, order, pred, weight, inputs, outRoot: root[out] < 0 ? -1 : pos[root[out]] };
}

/** Component `k` of the solution of the complex system (Are + j·Aim) y = b (destroys its inputs). */
function solveFor(
  Are: Float64Array[],
  Aim: Float64Array[],
  bre: Float64Array,
  bim: Float64Array,
  m: number,
  k: number,
  w: number,
): Complex {
  for (let c = 0; c < m; c++) {
    let p = c;
    let best = Math.abs(Are[c][c]) + Math.abs(Aim[c][c]);
    for (let r = c + 1; r < m; r++) {
      const v = Math.abs(Are[r][c]) + Math.abs(Aim[r][c]);
      if (v > best) {
        best = v;
        p = r;
      }
    }
    if (best === 0)
      throw new InputError(`the diagram is singular at ω = ${w} rad/s (a pole of the closed loop on the imaginary axis)`, {
        field: 'omega',
      });
    if (p !== c) {
      [Are[c], Are[p]] = [Are[p], Are[c]];
      [Aim[c], Aim[p]] = [Aim[p], Aim[c]];
      [bre[c], bre[p]] = [bre[p], bre[c]];
      [bim[c], bim[p]] = [bim[p], bim[c]];
    }
    const pr = Are[c][c];
    const pi = Aim[c][c];
    const pm = pr * pr + pi * pi;
    for (let r = c + 1; r < m; r++) {
      const xr = Are[r][c];
      const xi = Aim[r][c];
      if (xr === 0 && xi === 0) continue;
      const fr = (xr * pr + xi * pi) / pm;
      const fi = (xi * pr - xr * pi) / pm;
      const rr = Are[r];
      const ri = Aim[r];
      const cr = Are[c];
      const ci = Aim[c];
      for (let j = c; j < m; j++) {
        rr[j] -= fr * cr[j] - fi * ci[j];
        ri[j] -= fr * ci[j] + fi * cr[j];
      }
      bre[r] -= fr * bre[c] - fi * bim[c];
      bim[r] -= fr * bim[c] + fi * bre[c];
    }
  }
  const yr = new Float64Array(m);
  const yi = new Float64Array(m);
  for (let r = m - 1; r >= 0; r--) {
    let sr = bre[r];
    let si = bim[r];
    for (let j = r + 1; j < m; j++) {
      sr -= Are[r][j] * yr[j] - Aim[r][j] * yi[j];
      si -= Are[r][j] * yi[j] + Aim[r][j] * yr[j];
    }
    const pr = Are[r][r];
    const pi = Aim[r][r];
    const pm = pr * pr + pi * pi;
    yr[r] = (sr * pr + si * pi) / pm;
    yi[r] = (si * pr - sr * pi) / pm;
    if (r === k) break; // rows above k are not needed for y_k
  }
  return cx(yr[k], yi[k]);
}

/** Sum of dead times on nodes that lie on a cycle of W (strongly connected with a path back). */
function loopDelaysOf(W: Float64Array[], delays: readonly number[]): number {
  const m = W.length;
  let sum = 0;
  for (let v = 0; v < m; v++) {
    if (!(delays[v] > 0)) continue;
    // v is on a cycle when it reaches itself.
    const seen = new Uint8Array(m);
    const stack = [v];
    let back = false;
    while (stack.length && !back) {
      const a = stack.pop()!;
      for (let b = 0; b < m; b++) {
        if (W[b][a] === 0) continue;
        if (b === v) {
          back = true;
          break;
        }
        if (!seen[b]) {
          seen[b] = 1;
          stack.push(b);
        }
      }
    }
    if (back) sum += delays[v];
  }
  return sum;
}
