import * as P from './poly.ts';
import { type Complex, cdiv, cx } from './complex.ts';
import { InputError } from './errors.ts';

/**
 * A real rational function num(s)/den(s), coefficients in ascending powers (see poly.ts).
 * Operations keep it normalised: the denominator is monic (leading coefficient 1) and the
 * zero function is 0/1. Common roots are NOT removed here: use `cancelCommon` (cancel.ts),
 * which reports what it removed, so that hidden modes are never lost silently.
 */
export interface Rational {
  readonly num: readonly number[];
  readonly den: readonly number[];
}

export function rational(num: P.Poly, den: P.Poly = [1]): Rational {
  const d = P.trim(den);
  if (d.length === 0) throw new InputError('rational function with a zero denominator');
  const n = P.trim(num);
  const l = d[d.length - 1];
  if (n.length === 0) return { num: [], den: [1] };
  return { num: P.scale(n, 1 / l), den: P.scale(d, 1 / l) };
}

export const rconst = (c: number): Rational => rational(P.constant(c));
/** The Laplace variable s itself. */
export const S: Rational = { num: [0, 1], den: [1] };

const sameDen = (a: readonly number[], b: readonly number[]) => a.length === b.length && a.every((x, i) => x === b[i]);

export function radd(a: Rational, b: Rational): Rational {
  if (sameDen(a.den, b.den)) return rational(P.add(a.num, b.num), a.den);
  return rational(P.add(P.mul(a.num, b.den), P.mul(b.num, a.den)), P.mul(a.den, b.den));
}
export const rneg = (a: Rational): Rational => ({ num: P.scale(a.num, -1), den: a.den });
export const rsub = (a: Rational, b: Rational): Rational => radd(a, rneg(b));
export const rmul = (a: Rational, b: Rational): Rational => rational(P.mul(a.num, b.num), P.mul(a.den, b.den));
export const rscale = (a: Rational, k: number): Rational => rational(P.scale(a.num, k), a.den);

export function rdiv(a: Rational, b: Rational): Rational {
  if (P.isZero(b.num)) throw new InputError('division by a rational function that is identically zero');
  return rational(P.mul(a.num, b.den), P.mul(a.den, b.num));
}

export function rinv(a: Rational): Rational {
  if (P.isZero(a.num)) throw new InputError('inverse of a rational function that is identically zero');
  return rational(a.den, a.num);
}

/** a^n for an integer n (negative powers invert). */
export function rpow(a: Rational, n: number): Rational {
  if (!Number.isInteger(n)) throw new InputError(`power must be an integer, got ${n}`);
  if (n < 0) return rpow(rinv(a), -n);
  return rational(P.pow(a.num, n), P.pow(a.den, n));
}

/** Composition a(b(s)), e.g. for frequency scaling s → s/ω0. */
export function rcompose(a: Rational, b: Rational): Rational {
  // a = N/D with deg N = n, deg D = d; substitute b = p/q and clear q^max(n,d).
  const n = a.num.length - 1;
  const d = a.den.length - 1;
  const m = Math.max(n, d, 0);
  const homog = (c: readonly number[]) => {
    let out: number[] = [];
    for (let i = 0; i < c.length; i++) {
      out = P.add(out, P.scale(P.mul(P.pow(b.num, i), P.pow(b.den, m - i)), c[i]));
    }
    return out;
  };
  return rational(homog(a.num), homog(a.den));
}

/** d/ds of a rational function: (N'D − ND')/D². */
export function rderivative(a: Rational): Rational {
  return rational(P.sub(P.mul(P.derivative(a.num), a.den), P.mul(a.num, P.derivative(a.den))), P.mul(a.den, a.den));
}

export const relativeDegree = (a: Rational): number => (P.isZero(a.num) ? Infinity : P.degree(a.den) - P.degree(a.num));
export const isProper = (a: Rational): boolean => relativeDegree(a) >= 0;
export const isStrictlyProper = (a: Rational): boolean => relativeDegree(a) > 0;

export function revalReal(a: Rational, x: number): number {
  return P.evalReal(a.num, x) / P.evalReal(a.den, x);
}
export function revalComplex(a: Rational, z: Complex): Complex {
  return cdiv(P.evalComplex(a.num, z), P.evalComplex(a.den, z));
}
/** Value at s = ∞ of a proper function (the direct feedthrough); Infinity if improper. */
export function rvalueAtInfinity(a: Rational): number {
  const rd = relativeDegree(a);
  if (rd > 0) return 0;
  if (rd < 0) return P.lead(a.num) > 0 ? Infinity : -Infinity;
  return P.lead(a.num) / P.lead(a.den);
}
/** Static gain N(0)/D(0) (the value at s = 0); ±Infinity for a pole at the origin. */
export function rstaticGain(a: Rational): number {
  const n0 = a.num[0] ?? 0;
  const d0 = a.den[0] ?? 0;
  if (d0 === 0) return n0 === 0 ? NaN : n0 > 0 ? Infinity : -Infinity;
  return n0 / d0;
}

export const jw = (omega: number): Complex => cx(0, omega);

/** Human-readable "(num)/(den)" with highest powers first. */
export function rformat(a: Rational, digits = 6): string {
  const n = P.format(a.num, 's', digits);
  if (a.den.length === 1 && a.den[0] === 1) return n;
  return `(${n})/(${P.format(a.den, 's', digits)})`;
}
