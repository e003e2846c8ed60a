import { type Complex, InputError, cx, poly } from '@loopwright/lti';
import { type SignalGraph, relevantNodes } from './points.ts';

/**
 * The transmission of a prepared signal graph evaluated at s = jω by solving the linear
 * diagram there, every dead time kept exact as e^(−jωT) — including dead times inside other
 * loops, which the polynomial reduction must replace by Padé approximants. The node equations
 *   y_v = G_v(jω) · Σ_e w_e · y_from(e)      (the input node: y = 1; other sources: y = 0)
 * form the complex linear system (I − G·W) y = e_input, solved by Gaussian elimination with
 * partial pivoting; only the nodes on some path from the input to the output take part.
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
  const Are = Array.from({ length: m }, () => new Float64Array(m));
  const Aim = Array.from({ length: m }, () => new Float64Array(m));
  const bre = new Float64Array(m);
  const bim = new Float64Array(m);
  const gre = new Float64Array(m);
  const gim = new Float64Array(m);
  const evaluate = (w: number): Complex => {
    if (!(w >= 0) || !Number.isFinite(w)) throw new InputError(`frequency ${w} rad/s: must be finite and ≥ 0`, { field: 'omega' });
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
    // A = I − G·W (row i scaled by node i's gain), b = e_input.
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
