import type { Complex } from './complex.ts';
import { InputError, MAX_ORDER } from './errors.ts';
import * as P from './poly.ts';
import { MAX_PADE_ORDER, padeDelay, padePoles } from './pade.ts';
import { factorPoly, factoredFromRoots, factoredProduct, pencilDegree, pencilRootsContinued, reconcileWithCoefficients } from './pencil.ts';
import { polyRootsDetailed, worstRelative } from './roots.ts';
import { compareComplex, cx } from './complex.ts';

/** Six digits: below this the closed-loop poles are reported as of limited accuracy. */
export const ACCURACY_LIMIT = 1e-6;

export interface ClosedLoopPoles {
  poles: Complex[];
  /** Estimated absolute error of each pole (same order). */
  errors: number[];
  worstRelativeError: number;
  limited: boolean;
  /** Order (n, n) of the Padé approximant used for the dead time; null without dead time. */
  padeOrder: number | null;
}

/** The roots of a characteristic polynomial solved in coefficients (none for a constant). */
function fromCoefficients(p: readonly number[], padeOrder: number | null): ClosedLoopPoles {
  if (p.length <= 1) return { poles: [], errors: [], worstRelativeError: 0, limited: false, padeOrder };
  const r = polyRootsDetailed(p);
  return {
    poles: r.roots,
    errors: r.errors,
    worstRelativeError: r.worstRelativeError,
    limited: r.worstRelativeError > ACCURACY_LIMIT,
    padeOrder,
  };
}

/**
 * Closed-loop poles of 1 + L = 0 with L = N/D·e^(−sT): the roots of D·Dp + N·Np, where Np/Dp is
 * the (n, n) Padé approximant of the dead time. Solved in product form (pencil.ts: the roots of
 * D and N, the Padé poles x_i/T and zeros −x_i/T), so that high orders keep their digits —
 * (s + 1)^40 + 4 has its forty roots on the circle |s + 1| = 4^(1/40) to ~1e-15, where the
 * expanded coefficients fix them only to ±0.5 — and long dead times never form overflowing
 * coefficients. Each pole comes with an error estimate.
 */
export function closedLoopPolesDetailed(num: readonly number[], den: readonly number[], delay: number, order?: number): ClosedLoopPoles {
  const cn = P.trim(num);
  const cd = P.trim(den);
  if (cd.length === 0) throw new InputError('the loop has a zero denominator');
  let padeOrder: number | null = null;
  let poles: Complex[];
  let padeP: Complex[] = [];
  if (delay > 0 && cn.length > 0) {
    const room = MAX_ORDER - Math.max(cd.length, cn.length) + 1;
    const want = order ?? 6;
    if (!Number.isInteger(want) || want < 1 || want > MAX_PADE_ORDER) {
      throw new InputError(`Padé order must be a whole number from 1 to ${MAX_PADE_ORDER}, got ${want}`, { field: 'padeOrder' });
    }
    padeOrder = Math.max(1, Math.min(want, room));
    padeP = padePoles(delay, padeOrder);
  }
  // The same characteristic polynomial in coefficients, where it is representable (for the
  // degree check and the reconciliation of product-form roots with it).
  let coeffs: number[] | null;
  try {
    if (padeOrder !== null) {
      const pd = padeDelay(delay, padeOrder);
      coeffs = P.add(P.mul(cd, pd.den), P.mul(cn, pd.num));
    } else coeffs = P.add(cd, cn);
    if (!coeffs.every(Number.isFinite)) coeffs = null;
  } catch (err) {
    if (!(err instanceof InputError)) throw err;
    coeffs = null;
  }
  if (coeffs !== null && coeffs.length === 0) throw new InputError('the closed-loop characteristic polynomial 1 + L is identically zero');
  if (cn.length === 0) return fromCoefficients(cd, padeOrder);
  const Df = factorPoly(cd);
  const Nf = factorPoly(cn);
  // A root beyond the floating-point range (1e-320·s + 1 has its zero at −1e320) has no product
  // form: solve the coefficients, which are representable, directly.
  const unrepresentable =
    [...Df.factors, ...Nf.factors].some((f) => !Number.isFinite(f.root.re) || !Number.isFinite(f.root.im)) ||
    !Number.isFinite(Df.lead) ||
    !Number.isFinite(Nf.lead);
  if (unrepresentable && coeffs === null) {
    throw new InputError(
      'closed-loop poles: a root of the loop lies beyond the floating-point range (a negligible leading coefficient, |s| > 1e308) and the characteristic polynomial is not representable either: drop that term',
    );
  }
  if (unrepresentable && coeffs !== null) {
    return fromCoefficients(coeffs, padeOrder);
  }
  const A = padeP.length ? factoredProduct(Df, factoredFromRoots(padeP, 1)) : Df;
  const B = padeP.length
    ? factoredProduct(
        Nf,
        factoredFromRoots(
          padeP.map((p) => cx(-p.re, -p.im)),
          padeOrder! % 2 ? -1 : 1,
        ),
      )
    : Nf;
  const degree = pencilDegree(A, B, 1);
  if (coeffs !== null && coeffs.length - 1 < degree) {
    // The leading terms cancel beyond the first (an improper-looking closed loop): solve the
    // coefficients directly.
    return fromCoefficients(coeffs, padeOrder);
  }
  const sol = pencilRootsContinued(A, B, 1);
  poles = sol.roots.slice();
  const errors = sol.errors.slice();
  if (coeffs !== null) reconcileWithCoefficients(coeffs, poles, errors);
  const order2 = poles.map((z, i) => ({ z, e: errors[i] })).sort((a, b) => compareComplex(a.z, b.z));
  poles = order2.map((q) => q.z);
  const errs = order2.map((q) => q.e);
  const worst = worstRelative(poles, errs);
  return { poles, errors: errs, worstRelativeError: worst, limited: !sol.converged || worst > ACCURACY_LIMIT, padeOrder };
}
