import { type Complex, InputError, type Rational, assertFinite, cexp, cx, poly as P, rational, revalComplex, rmul } from '@loopwright/lti';

/**
 * A pulse transfer function H(z) = num(z)/den(z) of a system sampled every `sampleTime`
 * seconds. Coefficients are ASCENDING powers of z (as every polynomial in Loopwright); the
 * denominator is monic. A causal system has deg num ≤ deg den; a delay of d samples is the
 * factor z^(−d), i.e. d more powers of z in the denominator.
 */
export interface DiscreteTransferFunction {
  readonly rational: Rational;
  readonly sampleTime: number;
}

/** Checks a sample time: finite and > 0 (seconds); `what` names the field at fault. */
export function checkSampleTime(T: number, what = 'sampleTime'): number {
  if (typeof T !== 'number' || !Number.isFinite(T) || T <= 0) {
    throw new InputError(`${what}: the sample time must be a finite number of seconds > 0, got ${T}`, { field: what });
  }
  return T;
}

/** H(z) from ascending coefficients in z; throws InputError for a non-causal (improper) H. */
export function discreteTransfer(
  num: readonly number[],
  den: readonly number[],
  sampleTime: number,
  what = 'pulse transfer function',
): DiscreteTransferFunction {
  checkSampleTime(sampleTime);
  assertFinite(num, `${what} numerator`);
  assertFinite(den, `${what} denominator`);
  const r = rational(num, den);
  if (P.degree(r.num) > P.degree(r.den)) {
    throw new InputError(
      `${what} is not causal: numerator degree ${P.degree(r.num)} is above denominator degree ${P.degree(r.den)} (the output would need future inputs)`,
      { field: what },
    );
  }
  return { rational: r, sampleTime };
}

/** H(z) at a complex z. */
export const dtEval = (h: DiscreteTransferFunction, z: Complex): Complex => revalComplex(h.rational, z);

/** H(e^(jωT)): the frequency response at ω rad/s. */
export const dtFrequencyValue = (h: DiscreteTransferFunction, omega: number): Complex => dtEval(h, cexp(cx(0, omega * h.sampleTime)));

/** Series connection of two pulse transfer functions with the same sample time. */
export function dtMul(a: DiscreteTransferFunction, b: DiscreteTransferFunction): DiscreteTransferFunction {
  if (Math.abs(a.sampleTime - b.sampleTime) > 1e-12 * Math.max(a.sampleTime, b.sampleTime)) {
    throw new InputError(`cannot connect pulse transfer functions of different sample times (${a.sampleTime} s and ${b.sampleTime} s)`);
  }
  return { rational: rmul(a.rational, b.rational), sampleTime: a.sampleTime };
}

/** Multiplies by z^(−d): d whole samples of delay. */
export function dtDelay(h: DiscreteTransferFunction, samples: number): DiscreteTransferFunction {
  if (!Number.isInteger(samples) || samples < 0) throw new InputError(`a delay in samples must be a whole number ≥ 0, got ${samples}`);
  if (samples === 0) return h;
  const zd = new Array<number>(samples + 1).fill(0);
  zd[samples] = 1;
  return { rational: rational(h.rational.num, P.mul(h.rational.den, zd)), sampleTime: h.sampleTime };
}

/**
 * A difference equation in the delay operator z^(−1):
 *   a[0]·y(k) + a[1]·y(k−1) + … + a[n]·y(k−n) = b[0]·x(k) + b[1]·x(k−1) + … + b[n]·x(k−n),
 * a[0] = 1. `b[i]` and `a[i]` are the coefficients of z^(−i) (ascending in z^(−1)).
 */
export interface DifferenceEquation {
  b: number[];
  a: number[];
}

/** The difference equation of a causal H(z): divide num and den by z^n (n = deg den). */
export function differenceEquation(h: DiscreteTransferFunction): DifferenceEquation {
  const den = P.trim(h.rational.den);
  const num = P.trim(h.rational.num);
  const n = den.length - 1;
  const a: number[] = [];
  const b: number[] = [];
  for (let i = 0; i <= n; i++) {
    a.push(den[n - i] / den[n]);
    b.push((num[n - i] ?? 0) / den[n]);
  }
  return { b, a };
}

/** H(z) from a difference equation (inverse of `differenceEquation`). */
export function fromDifferenceEquation(eq: DifferenceEquation, sampleTime: number): DiscreteTransferFunction {
  if (eq.a.length === 0 || eq.a[0] === 0)
    throw new InputError('difference equation: a[0] (the weight of the newest output) must be non-zero', { field: 'a' });
  const n = Math.max(eq.a.length, eq.b.length) - 1;
  const num = new Array<number>(n + 1).fill(0);
  const den = new Array<number>(n + 1).fill(0);
  eq.b.forEach((c, i) => (num[n - i] = c));
  eq.a.forEach((c, i) => (den[n - i] = c));
  return discreteTransfer(num, den, sampleTime, 'difference equation');
}

/**
 * The output of H(z) for an input sequence, zero initial state, by its difference equation
 * (the linear recursion; no limits).
 */
export function filterSequence(h: DiscreteTransferFunction | DifferenceEquation, input: readonly number[]): number[] {
  const { a, b } = 'rational' in h ? differenceEquation(h) : h;
  const out: number[] = [];
  for (let k = 0; k < input.length; k++) {
    let acc = 0;
    for (let i = 0; i < b.length && i <= k; i++) acc += b[i] * input[k - i];
    for (let i = 1; i < a.length && i <= k; i++) acc -= a[i] * out[k - i];
    out.push(acc / a[0]);
  }
  return out;
}

/** The unit-step response of H(z) at k = 0 … count − 1 (t = kT). */
export const discreteStepResponse = (h: DiscreteTransferFunction, count: number): number[] =>
  filterSequence(h, new Array<number>(count).fill(1));

/** Human-readable "(num)/(den)" in z, highest power first. */
export function dtFormat(h: DiscreteTransferFunction, digits = 6): string {
  const n = P.format(h.rational.num, 'z', digits);
  const d = P.trim(h.rational.den);
  return d.length === 1 && d[0] === 1 ? n : `(${n})/(${P.format(d, 'z', digits)})`;
}

/** Static gain H(1) (±Infinity with a pole at z = 1). */
export function dtStaticGain(h: DiscreteTransferFunction): number {
  const n = P.evalReal(h.rational.num, 1);
  const d = P.evalReal(h.rational.den, 1);
  if (d === 0) return n === 0 ? NaN : n > 0 ? Infinity : -Infinity;
  return n / d;
}
