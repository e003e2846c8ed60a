import { type Complex, InputError, cx, matrixEigenvalues, padeDelay, poly, rational, realize } from '@loopwright/lti';
import { Matrix, inverse } from 'ml-matrix';
import type { ParameterOverrides } from '../resolve.ts';
import { type ReduceOptions, DEFAULT_PADE_ORDER, type Linearisable, compiledOf } from './reduce.ts';
import { type SignalGraph, type SignalRef, prepareTransmission, wholeGraph } from './points.ts';

/**
 * Method B: a state-space assembly of the whole diagram, independent of the elimination of
 * method A. Each block is realised on its own (controllable canonical form; every dead time
 * replaced by its Padé approximant), then interconnected: with block outputs y, states x,
 * block feedthroughs D (diagonal), branch weights W (u_v = Σ W[v][a]·y_a) and an injection u,
 *   y = C x + D (W y + E u) + F u   ⇒   (I − D W) y = C x + (D E + F) u,
 * which needs I − D W invertible (no ill-posed algebraic loop), and then
 *   ẋ = A x + B (W y + E u).
 */
export interface AssembledSystem {
  A: number[][];
  B: number[];
  C: number[];
  D: number;
  /** Block id owning each state. */
  stateOwners: string[];
}

function assemble(g: SignalGraph, order: number): AssembledSystem {
  const n = g.ids.length;
  const blocks = g.ids.map((id, v) => {
    let num = g.num[v];
    let den = g.den[v];
    if (g.delay[v] > 0) {
      const p = padeDelay(g.delay[v], order);
      num = poly.mul(num, p.num);
      den = poly.mul(den, p.den);
    }
    if (g.kinds[v] === 'source') return { A: [], B: [], C: [], D: 0 };
    return realize(rational(num, den), `block ${id}`);
  });
  const offset: number[] = [];
  let nx = 0;
  for (const b of blocks) {
    offset.push(nx);
    nx += b.A.length;
  }
  const W = Matrix.zeros(n, n);
  for (const br of g.branches) if (br.to >= 0) W.set(br.to, br.from, W.get(br.to, br.from) + br.weight);
  const E = new Array<number>(n).fill(0);
  const F = new Array<number>(n).fill(0);
  // The injection node is a source: its output is u itself.
  F[g.input] = 1;
  const Dm = Matrix.zeros(n, n);
  const Cm = Matrix.zeros(n, nx);
  const Bm = Matrix.zeros(nx, n);
  const A = Matrix.zeros(nx, nx);
  blocks.forEach((b, v) => {
    const o = offset[v];
    Dm.set(v, v, b.D);
    for (let i = 0; i < b.A.length; i++) {
      Cm.set(v, o + i, b.C[i]);
      Bm.set(o + i, v, b.B[i]);
      for (let j = 0; j < b.A.length; j++) A.set(o + i, o + j, b.A[i][j]);
    }
  });
  const M = Matrix.eye(n, n).sub(Dm.mmul(W));
  let Mi: Matrix;
  try {
    Mi = inverse(M);
  } catch {
    throw new InputError('the diagram is ill-posed: an algebraic loop has loop gain 1 at high frequency (I − D·W is singular)');
  }
  if (!Mi.to2DArray().every((r) => r.every(Number.isFinite))) {
    throw new InputError('the diagram is ill-posed: an algebraic loop has loop gain 1 at high frequency (I − D·W is singular)');
  }
  const DEF = Matrix.columnVector(E.map((e, v) => Dm.get(v, v) * e + F[v]));
  const yx = Mi.mmul(Cm); // y = yx·x + yu·u
  const yu = Mi.mmul(DEF);
  const Acl = A.add(Bm.mmul(W).mmul(yx));
  const Bcl = Bm.mmul(W.mmul(yu).add(Matrix.columnVector(E)));
  const out = g.output;
  const stateOwners: string[] = [];
  blocks.forEach((b, v) => {
    for (let i = 0; i < b.A.length; i++) stateOwners.push(g.ids[v]);
  });
  return {
    A: Acl.to2DArray(),
    B: Bcl.getColumn(0),
    C: out >= 0 ? yx.getRow(out) : new Array<number>(nx).fill(0),
    D: out >= 0 ? yu.get(out, 0) : 0,
    stateOwners,
  };
}

/** State-space model from an injection at `from` to a measurement at `to` (method B). */
export function assembleStateSpace(
  d: Linearisable,
  from: SignalRef,
  to: SignalRef,
  overrides?: ParameterOverrides,
  opts: ReduceOptions = {},
): AssembledSystem {
  return assemble(prepareTransmission(compiledOf(d, overrides), from, to), opts.padeOrder ?? DEFAULT_PADE_ORDER);
}

/** The whole diagram's state matrix (no input or output). */
export function assembleWhole(d: Linearisable, overrides?: ParameterOverrides, opts: ReduceOptions = {}): AssembledSystem {
  const g = wholeGraph(compiledOf(d, overrides));
  // A dummy input node keeps the assembly uniform; it feeds nothing.
  g.ids.push('(none)');
  g.kinds.push('source');
  g.num.push([1]);
  g.den.push([1]);
  g.delay.push(0);
  return assemble({ ...g, input: g.ids.length - 1, output: -1 }, opts.padeOrder ?? DEFAULT_PADE_ORDER);
}

/** Eigenvalues of a real square matrix (ml-matrix), sorted by real then imaginary part. */
export function eigenvalues(A: number[][]): Complex[] {
  if (A.length === 0) return [];
  // Balance first: block realisations mix time scales (a Padé block of a 0.5 ms delay has
  // companion entries ~1e12), which costs the unbalanced eigenvalues several digits.
  return matrixEigenvalues(A, 'assembled state matrix of the diagram').sort((a, b) => a.re - b.re || a.im - b.im);
}

/** Closed-loop poles by method B: eigenvalues of the assembled state matrix (all dead times Padé). */
export function closedLoopPolesStateSpace(d: Linearisable, overrides?: ParameterOverrides, opts: ReduceOptions = {}): Complex[] {
  return eigenvalues(assembleWhole(d, overrides, opts).A);
}

/** C (sI − A)^−1 B + D at a complex point, by Gaussian elimination with partial pivoting. */
export function evaluateStateSpace(sys: AssembledSystem, s: Complex): Complex {
  const n = sys.A.length;
  if (n === 0) return cx(sys.D);
  // Solve (sI − A) x = B over complex numbers, real and imaginary parts kept side by side.
  const re = sys.A.map((row, i) => row.map((a, j) => (i === j ? s.re : 0) - a));
  const im = sys.A.map((row, i) => row.map((_, j) => (i === j ? s.im : 0)));
  const br = sys.B.slice();
  const bi = new Array<number>(n).fill(0);
  for (let k = 0; k < n; k++) {
    let p = k;
    for (let i = k + 1; i < n; i++) if (Math.hypot(re[i][k], im[i][k]) > Math.hypot(re[p][k], im[p][k])) p = i;
    [re[k], re[p]] = [re[p], re[k]];
    [im[k], im[p]] = [im[p], im[k]];
    [br[k], br[p]] = [br[p], br[k]];
    [bi[k], bi[p]] = [bi[p], bi[k]];
    const pr = re[k][k];
    const pi = im[k][k];
    const pm = pr * pr + pi * pi;
    if (pm === 0) throw new InputError(`s = ${s.re}+${s.im}j is an eigenvalue of the assembled system`);
    for (let i = k + 1; i < n; i++) {
      // f = a[i][k] / a[k][k]
      const fr = (re[i][k] * pr + im[i][k] * pi) / pm;
      const fi = (im[i][k] * pr - re[i][k] * pi) / pm;
      if (fr === 0 && fi === 0) continue;
      for (let j = k; j < n; j++) {
        re[i][j] -= fr * re[k][j] - fi * im[k][j];
        im[i][j] -= fr * im[k][j] + fi * re[k][j];
      }
      br[i] -= fr * br[k] - fi * bi[k];
      bi[i] -= fr * bi[k] + fi * br[k];
    }
  }
  const xr = new Array<number>(n).fill(0);
  const xi = new Array<number>(n).fill(0);
  for (let k = n - 1; k >= 0; k--) {
    let sr = br[k];
    let si = bi[k];
    for (let j = k + 1; j < n; j++) {
      sr -= re[k][j] * xr[j] - im[k][j] * xi[j];
      si -= re[k][j] * xi[j] + im[k][j] * xr[j];
    }
    const pr = re[k][k];
    const pi = im[k][k];
    const pm = pr * pr + pi * pi;
    xr[k] = (sr * pr + si * pi) / pm;
    xi[k] = (si * pr - sr * pi) / pm;
  }
  let yr = sys.D;
  let yi = 0;
  for (let j = 0; j < n; j++) {
    yr += sys.C[j] * xr[j];
    yi += sys.C[j] * xi[j];
  }
  return cx(yr, yi);
}
