import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { type Complex, cx } from './complex.ts';
import { InputError } from './errors.ts';

/**
 * Eigenvalues of a real square matrix through ml-matrix, made safe to call on any input:
 * ml-matrix's QR iteration never returns on a matrix holding NaN (measured: it spins
 * forever), so every entry is checked before and after balancing and a clear InputError is
 * thrown instead. `what` names the matrix in that message. Upper Hessenberg matrices (companion
 * matrices) go through `hessenbergEigenvalues`, which always terminates.
 */
export function matrixEigenvalues(A: readonly (readonly number[])[], what = 'matrix', doBalance = true, hessenberg = false): Complex[] {
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
  flushNegligible(work);
  let out: Complex[];
  if (hessenberg) out = hessenbergEigenvalues(work, what);
  else {
    const e = new EigenvalueDecomposition(new Matrix(work), { assumeSymmetric: false });
    out = e.realEigenvalues.map((r, i) => cx(r, e.imaginaryEigenvalues[i]));
  }
  if (out.some((z) => !Number.isFinite(z.re) || !Number.isFinite(z.im))) {
    throw new InputError(`${what}: its eigenvalues overflow floating point (entries span too wide a range)`);
  }
  return out;
}

/**
 * Sets to zero the entries below 1e-150 of the largest: far below rounding, so the eigenvalues
 * do not change, but ml-matrix's QR iteration was measured to spin forever on a companion
 * matrix holding subnormal entries (coefficients 1e-323 next to 10).
 */
function flushNegligible(m: number[][]): void {
  let big = 0;
  for (const row of m) for (const v of row) big = Math.max(big, Math.abs(v));
  const tiny = big * 1e-150;
  for (const row of m) for (let j = 0; j < row.length; j++) if (Math.abs(row[j]) < tiny) row[j] = 0;
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

const sgn = (a: number, b: number) => (b >= 0 ? Math.abs(a) : -Math.abs(a));

/**
 * Eigenvalues of an upper Hessenberg matrix (a companion matrix is one) by the Francis
 * double-shift QR iteration with exceptional shifts, as in the classic hqr routine (Wilkinson &
 * Reinsch, Handbook for Automatic Computation II (from memory)). Unlike ml-matrix's general
 * routine it has an iteration cap, so it ends on every input: ml-matrix was measured to spin
 * forever on the companion matrix of −10 − 4e-32·s − … − 10·s¹⁰ (tiny coefficients).
 * Destroys `a`.
 */
export function hessenbergEigenvalues(a: number[][], what = 'matrix'): Complex[] {
  const n = a.length;
  const wr = new Array<number>(n).fill(0);
  const wi = new Array<number>(n).fill(0);
  let anorm = 0;
  for (let i = 0; i < n; i++) for (let j = Math.max(i - 1, 0); j < n; j++) anorm += Math.abs(a[i][j]);
  let nn = n - 1;
  let t = 0;
  let p = 0;
  let q = 0;
  let r = 0;
  // Scratch values of the QR sweep, each assigned before it is read.
  let s: number;
  let w: number;
  let x: number;
  let y: number;
  let z: number;
  while (nn >= 0) {
    let its = 0;
    let l: number;
    do {
      for (l = nn; l >= 1; l--) {
        s = Math.abs(a[l - 1][l - 1]) + Math.abs(a[l][l]);
        if (s === 0) s = anorm;
        if (Math.abs(a[l][l - 1]) <= 2.220446049250313e-16 * s) {
          a[l][l - 1] = 0;
          break;
        }
      }
      x = a[nn][nn];
      if (l === nn) {
        wr[nn] = x + t;
        wi[nn--] = 0;
      } else {
        y = a[nn - 1][nn - 1];
        w = a[nn][nn - 1] * a[nn - 1][nn];
        if (l === nn - 1) {
          p = 0.5 * (y - x);
          q = p * p + w;
          z = Math.sqrt(Math.abs(q));
          x += t;
          if (q >= 0) {
            z = p + sgn(z, p);
            wr[nn - 1] = wr[nn] = x + z;
            if (z) wr[nn] = x - w / z;
            wi[nn - 1] = wi[nn] = 0;
          } else {
            wr[nn - 1] = wr[nn] = x + p;
            wi[nn - 1] = -(wi[nn] = z);
          }
          nn -= 2;
        } else {
          if (its === 60) throw new InputError(`${what}: the eigenvalue iteration did not converge in 60 sweeps`);
          if (its === 10 || its === 20 || its === 40) {
            // Exceptional shift: breaks the cycles that plain Francis shifts can fall into.
            t += x;
            for (let i = 0; i <= nn; i++) a[i][i] -= x;
            s = Math.abs(a[nn][nn - 1]) + Math.abs(a[nn - 1][nn - 2]);
            y = x = 0.75 * s;
            w = -0.4375 * s * s;
          }
          ++its;
          let m: number;
          for (m = nn - 2; m >= l; m--) {
            z = a[m][m];
            r = x - z;
            s = y - z;
            p = (r * s - w) / a[m + 1][m] + a[m][m + 1];
            q = a[m + 1][m + 1] - z - r - s;
            r = a[m + 2][m + 1];
            s = Math.abs(p) + Math.abs(q) + Math.abs(r);
            p /= s;
            q /= s;
            r /= s;
            if (m === l) break;
            const u = Math.abs(a[m][m - 1]) * (Math.abs(q) + Math.abs(r));
            const v = Math.abs(p) * (Math.abs(a[m - 1][m - 1]) + Math.abs(z) + Math.abs(a[m + 1][m + 1]));
            if (u <= 2.220446049250313e-16 * v) break;
          }
          for (let i = m + 2; i <= nn; i++) {
            a[i][i - 2] = 0;
            if (i !== m + 2) a[i][i - 3] = 0;
          }
          for (let k = m; k <= nn - 1; k++) {
            if (k !== m) {
              p = a[k][k - 1];
              q = a[k + 1][k - 1];
              r = 0;
              if (k !== nn - 1) r = a[k + 2][k - 1];
              x = Math.abs(p) + Math.abs(q) + Math.abs(r);
              if (x !== 0) {
                p /= x;
                q /= x;
                r /= x;
              }
            }
            s = sgn(Math.sqrt(p * p + q * q + r * r), p);
            if (s !== 0) {
              if (k === m) {
                if (l !== m) a[k][k - 1] = -a[k][k - 1];
              } else a[k][k - 1] = -s * x;
              p += s;
              x = p / s;
              y = q / s;
              z = r / s;
              q /= p;
              r /= p;
              for (let j = k; j <= nn; j++) {
                p = a[k][j] + q * a[k + 1][j];
                if (k !== nn - 1) {
                  p += r * a[k + 2][j];
                  a[k + 2][j] -= p * z;
                }
                a[k + 1][j] -= p * y;
                a[k][j] -= p * x;
              }
              const mmin = nn < k + 3 ? nn : k + 3;
              for (let i = l; i <= mmin; i++) {
                p = x * a[i][k] + y * a[i][k + 1];
                if (k !== nn - 1) {
                  p += z * a[i][k + 2];
                  a[i][k + 2] -= p * r;
                }
                a[i][k + 1] -= p * q;
                a[i][k] -= p;
              }
            }
          }
        }
      }
    } while (l < nn - 1);
  }
  return wr.map((re, i) => cx(re, wi[i]));
}
