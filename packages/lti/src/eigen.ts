import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { type Complex, cx } from './complex.ts';
import { InputError } from './errors.ts';

/**
 * Eigenvalues of a real square matrix through ml-matrix, made safe to call on any input:
 * ml-matrix's QR iteration never returns on a matrix holding NaN (measured: it spins
 * forever), so every entry is checked before and after balancing and a clear InputError is
 * thrown instead. `what` names the matrix in that message.
 */
export function matrixEigenvalues(A: readonly (readonly number[])[], what = 'matrix', doBalance = true): Complex[] {
  const n = A.length;
  if (n === 0) return [];
  const m = A.map((row) => row.slice());
  requireFiniteMatrix(m, what);
  let work = m;
  if (doBalance) {
    const balanced = m.map((row) => row.slice());
    balanceMatrix(balanced);
    // Balancing only rescales by powers of two; should extreme entries still overflow, solve unbalanced.
    if (balanced.every((row) => row.every(Number.isFinite))) work = balanced;
  }
  const e = new EigenvalueDecomposition(new Matrix(work), { assumeSymmetric: false });
  const re = e.realEigenvalues;
  const im = e.imaginaryEigenvalues;
  const out = re.map((r, i) => cx(r, im[i]));
  if (out.some((z) => !Number.isFinite(z.re) || !Number.isFinite(z.im))) {
    throw new InputError(`${what}: its eigenvalues overflow floating point (entries span too wide a range)`);
  }
  return out;
}

function requireFiniteMatrix(m: readonly (readonly number[])[], what: string): void {
  for (let i = 0; i < m.length; i++) {
    if (m[i].length !== m.length) throw new InputError(`${what}: row ${i} has ${m[i].length} entries, expected ${m.length}`);
    for (let j = 0; j < m.length; j++) {
      if (!Number.isFinite(m[i][j])) {
        throw new InputError(
          `${what}: entry (${i + 1}, ${j + 1}) is ${m[i][j]} — the coefficients span too wide a range for floating point`,
        );
      }
    }
  }
}

/** Parlett–Reinsch diagonal balancing in place (powers of 2: exact), improves eigenvalue accuracy. */
export function balanceMatrix(a: number[][]): void {
  const n = a.length;
  const radix = 2;
  let done = false;
  for (let sweep = 0; !done && sweep < 100; sweep++) {
    done = true;
    for (let i = 0; i < n; i++) {
      let r = 0;
      let col = 0;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        col += Math.abs(a[j][i]);
        r += Math.abs(a[i][j]);
      }
      // Rows or columns that are (nearly) zero are decoupled: scaling them would only overflow.
      if (!(col > 1e-280) || !(r > 1e-280) || !Number.isFinite(col) || !Number.isFinite(r)) continue;
      let g = r / radix;
      let f = 1;
      const s = col + r;
      while (col < g && f < 2 ** 60) {
        f *= radix;
        col *= radix * radix;
      }
      g = r * radix;
      while (col > g && f > 2 ** -60) {
        f /= radix;
        col /= radix * radix;
      }
      if ((col + r) / f < 0.95 * s) {
        done = false;
        const inv = 1 / f;
        for (let j = 0; j < n; j++) a[i][j] *= inv;
        for (let j = 0; j < n; j++) a[j][i] *= f;
      }
    }
  }
}
