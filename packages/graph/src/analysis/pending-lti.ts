// TEMPORARY bridge until lti's cancel.ts and pade.ts land: uses them when exported, else a
// minimal stand-in (no cancellation; textbook Padé coefficients). Delete once both exist.
import * as lti from '@loopwright/lti';
import type { Complex, Rational } from '@loopwright/lti';

type Cancel = (r: Rational, tol?: number) => { result: Rational; cancelled: Complex[] };
type Pade = (T: number, order: number) => Rational;

export const cancelCommon: Cancel = (r, tol) => {
  const f = (lti as unknown as { cancelCommon?: Cancel }).cancelCommon;
  return f ? f(r, tol) : { result: r, cancelled: [] };
};

export const padeDelay: Pade = (T, n) => {
  const f = (lti as unknown as { padeDelay?: Pade }).padeDelay;
  if (f) return f(T, n);
  const fact = (k: number): number => (k <= 1 ? 1 : k * fact(k - 1));
  const den: number[] = [];
  const num: number[] = [];
  for (let k = 0; k <= n; k++) {
    const c = (fact(2 * n - k) * fact(n)) / (fact(2 * n) * fact(k) * fact(n - k)) * T ** k;
    den.push(c);
    num.push(k % 2 ? -c : c);
  }
  return lti.rational(num, den);
};
