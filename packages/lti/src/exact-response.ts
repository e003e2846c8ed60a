import { Matrix, solve } from 'ml-matrix';
import { InputError, assertFinite } from './errors.ts';
import * as P from './poly.ts';
import { type Rational, rational } from './rational.ts';
import { routhHurwitz } from './routh.ts';
import { realize } from './statespace.ts';

/**
 * Matrix exponential e^M by scaling and squaring with the (6,6) Padé approximant: M is scaled
 * by 2^−j so that its 1-norm is ≤ 0.5, where the (6,6) approximant's relative error bound is
 * about 4e-20 (below double rounding); then squared j times. Moler & Van Loan's "method 3"
 * (from memory). Validated against mathjs `expm` in the tests.
 */
export function matrixExponential(m: readonly (readonly number[])[]): number[][] {
  const n = m.length;
  if (n === 0) return [];
  for (const row of m) assertFinite(row, 'matrix');
  let norm = 0;
  for (let j = 0; j < n; j++) {
    let col = 0;
    for (let i = 0; i < n; i++) col += Math.abs(m[i][j]);
    norm = Math.max(norm, col);
  }
  const j = norm > 0.5 ? Math.ceil(Math.log2(norm / 0.5)) : 0;
  const A = new Matrix(m.map((r) => r.slice())).mul(2 ** -j);
  const q = 6;
  let c = 1;
  let X = Matrix.eye(n);
  let N = Matrix.eye(n);
  let D = Matrix.eye(n);
  for (let k = 1; k <= q; k++) {
    c = (c * (q - k + 1)) / (k * (2 * q - k + 1));
    X = A.mmul(X);
    const cX = X.clone().mul(c);
    N = N.add(cX);
    D = k % 2 ? D.sub(cX) : D.add(cX);
  }
  let E = solve(D, N);
  for (let k = 0; k < j; k++) E = E.mmul(E);
  return E.to2DArray();
}

/** Checks a time list: finite; the response routines accept any order. */
function checkTimes(t: readonly number[]): void {
  assertFinite(t, 'times');
}

/**
 * Propagates the augmented system z' = [[A, B],[0, 0]] z (z = [x; u]) exactly between the
 * requested times (sorted internally; one matrix exponential per distinct gap, so a uniform
 * grid costs one). Returns x at each time for x(0) = x0, u ≡ u0.
 */
function propagate(A: number[][], B: number[], x0: number[], u0: number, times: readonly number[]): number[][] {
  const n = A.length;
  const M: number[][] = [];
  for (let i = 0; i < n; i++) M.push([...A[i], B[i]]);
  M.push(new Array<number>(n + 1).fill(0));
  const order = times.map((_, i) => i).sort((a, b) => times[a] - times[b]);
  const out = new Array<number[]>(times.length);
  const cache = new Map<number, number[][]>();
  let z = [...x0, u0];
  let tPrev = 0;
  for (const idx of order) {
    const t = times[idx];
    if (t <= 0) {
      out[idx] = x0.slice();
      continue;
    }
    const h = t - tPrev;
    if (h > 0) {
      // Gaps of a uniform grid differ in the last bits; sharing one exponential among gaps
      // equal to 13 digits changes the result by ~1e-13 relative.
      const key = Number(h.toPrecision(13));
      let E = cache.get(key);
      if (!E) {
        E = matrixExponential(M.map((r) => r.map((v) => v * h)));
        if (cache.size < 64) cache.set(key, E);
      }
      const next = new Array<number>(n + 1).fill(0);
      for (let i = 0; i <= n; i++) {
        let s = 0;
        for (let k = 0; k <= n; k++) s += E[i][k] * z[k];
        next[i] = s;
      }
      z = next;
      tPrev = t;
    }
    out[idx] = z.slice(0, n);
  }
  return out;
}

/**
 * Exact unit-step response y(t) of a proper rational function with zero initial state, at the
 * given times, optionally delayed by a dead time (y = 0 for t < delay): via the controllable
 * canonical realisation and matrix exponentials. At t = delay the value is the one just after
 * the step (the direct feedthrough D), e.g. −1 for (1 − s)/(1 + s).
 */
export function exactStepResponse(r: Rational, times: readonly number[], delay = 0): number[] {
  checkTimes(times);
  if (!Number.isFinite(delay) || delay < 0) throw new InputError(`dead time must be a finite number ≥ 0 s, got ${delay}`);
  const { A, B, C, D } = realize(r);
  const shifted = times.map((t) => t - delay);
  const xs = propagate(
    A,
    B,
    new Array<number>(A.length).fill(0),
    1,
    shifted.map((t) => Math.max(t, 0)),
  );
  return shifted.map((t, i) => (t < 0 ? 0 : dot(C, xs[i]) + D));
}

/**
 * Exact impulse response: the regular part C·e^(At)·B at the given times (optionally delayed).
 * A biproper function (D ≠ 0) also has the Dirac term D·δ(t − delay), which is not sampled.
 */
export function exactImpulseResponse(r: Rational, times: readonly number[], delay = 0): number[] {
  checkTimes(times);
  if (!Number.isFinite(delay) || delay < 0) throw new InputError(`dead time must be a finite number ≥ 0 s, got ${delay}`);
  const { A, B, C } = realize(r);
  const shifted = times.map((t) => t - delay);
  const xs = propagate(
    A,
    new Array<number>(A.length).fill(0),
    B,
    0,
    shifted.map((t) => Math.max(t, 0)),
  );
  return shifted.map((t, i) => (t < 0 ? 0 : dot(C, xs[i])));
}

const dot = (a: readonly number[], b: readonly number[]) => a.reduce((s, v, i) => s + v * b[i], 0);

/** System type (net poles at s = 0) and static error constants of an open-loop G(s). */
export interface ErrorConstants {
  /** Poles at the origin minus zeros at the origin. */
  type: number;
  /** Position constant lim G(s), s → 0 (Infinity for type ≥ 1). */
  kp: number;
  /** Velocity constant lim s·G(s). */
  kv: number;
  /** Acceleration constant lim s²·G(s). */
  ka: number;
}

/** Strips exact factors of s; returns the count and the remaining polynomial. */
function originOrder(p: readonly number[]): { m: number; rest: number[] } {
  let c = P.trim(p);
  let m = 0;
  while (c.length > 1 && c[0] === 0) {
    c = c.slice(1);
    m++;
  }
  return { m, rest: c };
}

/** Error constants by the limits s^k·G(s), s → 0 (Nise, Sec. 7.3; Ogata, Sec. 5-8, from memory). */
export function errorConstants(G: Rational): ErrorConstants {
  if (P.isZero(G.num)) return { type: 0, kp: 0, kv: 0, ka: 0 };
  const n = originOrder(G.num);
  const d = originOrder(G.den);
  const type = d.m - n.m;
  const K = n.rest[0] / d.rest[0]; // lim s^type·G(s)
  const lim = (k: number) => (type > k ? Math.sign(K) * Infinity : type === k ? K : 0);
  return { type, kp: lim(0), kv: lim(1), ka: lim(2) };
}

/**
 * Steady-state error of a unity negative-feedback loop with open loop G, for the input
 * r(t) = amplitude·t^k/k! (k = inputOrder: 0 step, 1 ramp, 2 parabola t²/2), by the
 * final-value theorem e∞ = lim s·R(s)/(1 + G(s)), R = amplitude/s^(k+1). The theorem holds only
 * when the closed loop is stable, so that is checked first (Routh–Hurwitz on D + N); an
 * unstable or marginal loop is an InputError. Returns Infinity where the error grows without bound.
 */
export function steadyStateError(G: Rational, inputOrder: number, amplitude = 1): number {
  if (!Number.isInteger(inputOrder) || inputOrder < 0 || inputOrder > 10) {
    throw new InputError(`input order must be a whole number 0 (step), 1 (ramp), 2 (parabola), …; got ${inputOrder}`);
  }
  const g = rational(G.num, G.den);
  const chi = P.add(g.num, g.den);
  const rh = routhHurwitz(chi);
  if (rh.rhp > 0 || rh.jw > 0) {
    throw new InputError(
      `the closed loop is not stable (${rh.rhp} right-half-plane and ${rh.jw} imaginary-axis poles): the final-value theorem does not apply`,
    );
  }
  const { type, kp, kv, ka } = errorConstants(g);
  const k = inputOrder;
  if (k === 0) return amplitude / (1 + kp);
  if (type > k) return 0;
  if (type < k) return amplitude === 0 ? 0 : Math.sign(amplitude) * Infinity;
  const K = k === 1 ? kv : k === 2 ? ka : errorConstantOfOrder(g, k);
  return amplitude / K;
}

function errorConstantOfOrder(G: Rational, k: number): number {
  const n = originOrder(G.num);
  const d = originOrder(G.den);
  return d.m - n.m === k ? n.rest[0] / d.rest[0] : NaN;
}
