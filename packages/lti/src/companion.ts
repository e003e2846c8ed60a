import { type Complex, cx } from './complex.ts';
import { matrixEigenvalues } from './eigen.ts';
import { InputError } from './errors.ts';

/**
 * Eigenvalues of the companion matrix of c (ascending coefficients, c[n] ≠ 0, n ≥ 1): the raw
 * roots of the polynomial, before polishing. Upper Hessenberg form (first row −c[n−1..0]/c[n],
 * ones on the subdiagonal), balanced, then our capped Francis QR (eigen.ts), so it ends on
 * every input and refuses coefficient ranges that overflow with an InputError naming `what`.
 * Roots of equal modulus in symmetric patterns (±4 ± j) can make the shifted QR cycle until its
 * cap; then the polynomial is shifted, p(s + σ), which breaks the symmetry, and the roots
 * shifted back (the caller's Newton polishing on p restores the digits the shift costs).
 */
export function companionEigenvalues(c: readonly number[], what = 'companion matrix of the polynomial'): Complex[] {
  try {
    return hessenbergOf(c, what);
  } catch (err) {
    if (!(err instanceof InputError) || !/did not converge/.test(err.message)) throw err;
    const n = c.length - 1;
    const rho = Math.abs(c[0] / c[n]) ** (1 / n) || 1;
    for (const f of [0.3719, -0.6173]) {
      const sigma = f * rho;
      try {
        return hessenbergOf(taylorShift(c, sigma), what).map((z) => cx(z.re + sigma, z.im));
      } catch (again) {
        if (!(again instanceof InputError) || !/did not converge/.test(again.message)) throw again;
      }
    }
    throw err;
  }
}

function hessenbergOf(c: readonly number[], what: string): Complex[] {
  const n = c.length - 1;
  const lead = c[n];
  const m = new Array<number[]>(n);
  for (let i = 0; i < n; i++) m[i] = new Array<number>(n).fill(0);
  for (let j = 0; j < n; j++) m[0][j] = -c[n - 1 - j] / lead;
  for (let i = 1; i < n; i++) m[i][i - 1] = 1;
  return matrixEigenvalues(m, what, true, true);
}

/** Coefficients of p(s + σ) (Horner's complete scheme). */
function taylorShift(c: readonly number[], sigma: number): number[] {
  const t = c.slice();
  const n = t.length - 1;
  for (let j = 0; j < n; j++) for (let k = n - 1; k >= j; k--) t[k] += sigma * t[k + 1];
  return t;
}
