import { InputError } from './errors.ts';
import * as P from './poly.ts';
import type { Rational } from './rational.ts';

/** A single-input single-output state-space model ẋ = A x + B u, y = C x + D u. */
export interface StateSpace {
  A: number[][];
  B: number[];
  C: number[];
  D: number;
}

/**
 * Controllable canonical realisation of a proper rational function (denominator monic):
 * A has ones on the superdiagonal and −a0 … −a(n−1) in its last row, B = e_n, and C holds the
 * strictly proper remainder's coefficients. Minimal when num and den share no roots.
 */
export function realize(r: Rational, what = 'transfer function'): StateSpace {
  const den = P.trim(r.den);
  const num = P.trim(r.num);
  const n = den.length - 1;
  if (num.length - 1 > n) {
    throw new InputError(
      `${what} is improper (numerator degree ${num.length - 1} > denominator degree ${n}): it has no state-space realisation`,
    );
  }
  const lead = den[n];
  const a = den.map((c) => c / lead);
  const b = num.map((c) => c / lead);
  const D = n >= 0 && b.length === n + 1 ? b[n] : 0;
  const A: number[][] = [];
  for (let i = 0; i < n; i++) {
    const row = new Array<number>(n).fill(0);
    if (i < n - 1) row[i + 1] = 1;
    else for (let j = 0; j < n; j++) row[j] = -a[j];
    A.push(row);
  }
  const B = new Array<number>(n).fill(0);
  if (n > 0) B[n - 1] = 1;
  const C = new Array<number>(n).fill(0);
  for (let j = 0; j < n; j++) C[j] = (b[j] ?? 0) - D * a[j];
  return { A, B, C, D };
}
