import { levenbergMarquardt } from 'ml-levenberg-marquardt';

/**
 * Nonlinear least squares min Σ (y_i − f_i(p))² with ml-levenberg-marquardt, for a model that
 * produces all its values at once (a simulated response, not a formula per point): the
 * library's per-point callbacks read from a response and Jacobian computed once per parameter
 * vector.
 *
 * The library accepts every step (keeping the best point seen) and stops only on an absolute
 * error level or an iteration count. So it is run in rounds from the best point found, until a
 * round improves the sum of squares by less than `relTol` of it; residuals should be scaled
 * to order one by the caller (the fit divides by the output's range).
 */
export interface LeastSquaresProblem {
  y: ArrayLike<number>;
  /** Model values at every point. */
  model: (p: readonly number[]) => Float64Array;
  /** Jacobian columns ∂f/∂p_j at every point. */
  jacobian: (p: readonly number[]) => Float64Array[];
  start: readonly number[];
  min: readonly number[];
  max: readonly number[];
  /** Total iteration cap (default 400). */
  maxIterations?: number;
  /** Relative improvement per round below which the fit has converged (default 1e-12). */
  relTol?: number;
}

export interface LeastSquaresResult {
  p: number[];
  sse: number;
  iterations: number;
  converged: boolean;
}

/** Iterations per round: LM on a few parameters converges in about this many from a fair start. */
const ROUND = 8;

export function sumOfSquares(y: ArrayLike<number>, f: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < y.length; i++) s += (y[i] - f[i]) ** 2;
  return s;
}

/** f memoised for the last parameter values it was called with (compared by value). */
function lastCall<T>(f: (p: readonly number[]) => T): (p: readonly number[]) => T {
  let key = '';
  let value = undefined as T;
  return (p) => {
    const k = p.join(',');
    if (k !== key) {
      value = f(p);
      key = k;
    }
    return value;
  };
}

export function leastSquares(problem: LeastSquaresProblem): LeastSquaresResult {
  const { y } = problem;
  const maxIterations = problem.maxIterations ?? 400;
  const relTol = problem.relTol ?? 1e-12;
  const x = Array.from({ length: y.length }, (_, i) => i);
  // Cache by parameter values: the library calls model(p) and jacobian(p) with arrays it then
  // mutates, and asks for one point at a time.
  const modelAt = lastCall(problem.model);
  const jacAt = lastCall(problem.jacobian);
  let best = [...problem.start];
  let bestSse = sumOfSquares(y, modelAt(best));
  if (!Number.isFinite(bestSse)) return { p: best, sse: bestSse, iterations: 0, converged: false };
  let iterations = 0;
  // Rounding floor of residuals scaled to order one: nothing below it is an improvement.
  const floor = 1e-30 * y.length;
  let converged = bestSse <= floor;
  while (!converged && iterations < maxIterations) {
    const n = Math.min(ROUND, maxIterations - iterations);
    const r = levenbergMarquardt(
      { x, y },
      (p) => {
        const f = modelAt(p);
        return (i) => f[i];
      },
      {
        initialValues: best,
        minValues: problem.min,
        maxValues: problem.max,
        maxIterations: n,
        // Never stop on the library's absolute level: convergence is judged per round below.
        errorTolerance: 0,
        jacobianFunction: (p) => {
          const cols = jacAt(p);
          return (i) => cols.map((c) => c[i]);
        },
      },
    );
    iterations += r.iterations;
    const sse = sumOfSquares(y, modelAt(r.parameterValues));
    if (sse < bestSse) {
      const gain = bestSse - sse;
      best = [...r.parameterValues];
      bestSse = sse;
      converged = gain <= relTol * bestSse || bestSse <= floor;
    } else converged = true;
  }
  return { p: best, sse: bestSse, iterations, converged };
}

/**
 * The inverse of a small symmetric positive semi-definite matrix (JᵀJ) by Cholesky on its
 * correlation form (scaled to a unit diagonal, so the pivot test is scale-free); null when it
 * is numerically singular (a parameter not determined by the data).
 */
export function symmetricInverse(a: readonly (readonly number[])[]): number[][] | null {
  const n = a.length;
  const d = a.map((row, i) => Math.sqrt(row[i]));
  if (d.some((v) => !(v > 0) || !Number.isFinite(v))) return null;
  const c = a.map((row, i) => row.map((v, j) => v / (d[i] * d[j])));
  // Cholesky c = L·Lᵀ.
  const L = c.map(() => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    let s = c[j][j];
    for (let k = 0; k < j; k++) s -= L[j][k] ** 2;
    if (!(s > 1e-13)) return null;
    L[j][j] = Math.sqrt(s);
    for (let i = j + 1; i < n; i++) {
      let t = c[i][j];
      for (let k = 0; k < j; k++) t -= L[i][k] * L[j][k];
      L[i][j] = t / L[j][j];
    }
  }
  // Inverse of L, then c⁻¹ = L⁻ᵀ·L⁻¹, then undo the scaling.
  const Li = L.map(() => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    Li[i][i] = 1 / L[i][i];
    for (let j = 0; j < i; j++) {
      let s = 0;
      for (let k = j; k < i; k++) s -= L[i][k] * Li[k][j];
      Li[i][j] = s / L[i][i];
    }
  }
  const out = a.map(() => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let k = Math.max(i, j); k < n; k++) s += Li[k][i] * Li[k][j];
      out[i][j] = s / (d[i] * d[j]);
    }
  }
  return out;
}

/** JᵀJ from Jacobian columns. */
export function normalMatrix(cols: readonly ArrayLike<number>[]): number[][] {
  const p = cols.length;
  const out = cols.map(() => new Array<number>(p).fill(0));
  for (let i = 0; i < p; i++) {
    for (let j = i; j < p; j++) {
      let s = 0;
      const a = cols[i];
      const b = cols[j];
      for (let k = 0; k < a.length; k++) s += a[k] * b[k];
      out[i][j] = s;
      out[j][i] = s;
    }
  }
  return out;
}
