import { type Complex, cexp, cmul, cx } from './complex.ts';
import { InputError } from './errors.ts';
import { type Rational, rational, revalComplex, rmul } from './rational.ts';

/**
 * A transfer-function value: a rational part times an optional dead time e^(−s·delay),
 * delay ≥ 0 in seconds. The delay is kept exact for frequency response and simulation and is
 * replaced by a Padé approximant only where poles are needed (pade.ts).
 */
export interface TransferFunction {
  readonly rational: Rational;
  readonly delay: number;
}

export function transfer(r: Rational, delay = 0): TransferFunction {
  if (!Number.isFinite(delay) || delay < 0) {
    throw new InputError(`dead time must be a finite number ≥ 0 s, got ${delay}`);
  }
  return { rational: r, delay };
}

export const tfFromCoefficients = (num: readonly number[], den: readonly number[], delay = 0) => transfer(rational(num, den), delay);

export const tmul = (a: TransferFunction, b: TransferFunction): TransferFunction =>
  transfer(rmul(a.rational, b.rational), a.delay + b.delay);

/** G(z) including the dead-time factor. */
export function tevalComplex(g: TransferFunction, z: Complex): Complex {
  const v = revalComplex(g.rational, z);
  return g.delay === 0 ? v : cmul(v, cexp(cx(-z.re * g.delay, -z.im * g.delay)));
}
