import { InputError, MAX_ORDER, assertFinite } from './errors.ts';
import { type Poly, trim } from './poly.ts';

/** A row of zeros met while building the array, and the auxiliary polynomial that replaced it. */
export interface RouthAuxiliary {
  /** Index in `array` of the row the auxiliary polynomial was formed from. */
  row: number;
  /** Its power: the auxiliary polynomial has degree `power` and only powers power, power−2, … */
  power: number;
  /** Auxiliary polynomial, ASCENDING coefficients. Its roots are roots of the input too. */
  poly: number[];
}

export interface RouthResult {
  /** Rows from s^n down to s^0 (row i belongs to power n − i), as a textbook prints them. */
  array: number[][];
  /** The power each row belongs to. */
  powers: number[];
  /** First element of each row (ε rows hold the small positive number that stood in for 0). */
  firstColumn: number[];
  /** Number of sign changes in the first column (= right-half-plane roots). */
  signChanges: number;
  rhp: number;
  /** Roots on the imaginary axis, the origin included. */
  jw: number;
  lhp: number;
  /** Rows whose zero first element (rest non-zero) was replaced by ε → 0⁺. */
  epsilonRows: number[];
  /** Rows of zeros, each replaced by the derivative of the auxiliary polynomial from the row above. */
  auxiliaries: RouthAuxiliary[];
  /** The first auxiliary polynomial (its roots include every jω-axis root), or null. */
  auxiliary: number[] | null;
  /** Roots exactly at s = 0 (trailing zero coefficients), factored out before the array is built. */
  rootsAtOrigin: number;
}

/**
 * Routh–Hurwitz array of a real polynomial (ASCENDING coefficients). Special cases, as in the
 * textbooks: a zero first element with a non-zero rest of row is replaced by ε → 0⁺ (here a
 * small positive number × the row scale, run at two sizes to recognise entries that vanish in
 * the limit; see below); a row of zeros is replaced by the derivative of the
 * auxiliary polynomial formed from the row above. Counting: RHP = sign changes of the first
 * column; the first auxiliary polynomial A (degree k) has roots symmetric about the origin,
 * and the sign changes from its row down count its RHP roots, so jω = k − 2·(those changes).
 * Roots at the origin are factored out first and counted as jω roots.
 * A value is treated as zero when |x| ≤ 1e-12 × the size of the entries it was computed from.
 */
export function routhHurwitz(p: Poly): RouthResult {
  assertFinite(p, 'polynomial coefficients');
  let c = trim(p);
  if (c.length === 0) throw new InputError('the zero polynomial has no Routh array');
  if (c.length - 1 > MAX_ORDER) throw new InputError(`polynomial of degree ${c.length - 1} is above the limit of ${MAX_ORDER}`);
  let rootsAtOrigin = 0;
  while (c.length > 1 && c[0] === 0) {
    c = c.slice(1);
    rootsAtOrigin++;
  }
  const n = c.length - 1;
  const desc = c.slice().reverse(); // a_n, a_(n−1), …, a_0
  const width = Math.floor(n / 2) + 1;
  const row0: number[] = [];
  const row1: number[] = [];
  for (let j = 0; j < width; j++) {
    row0.push(desc[2 * j] ?? 0);
    row1.push(desc[2 * j + 1] ?? 0);
  }
  // The array is built twice in lockstep, with ε = 1e-5 and 1e-8 (× row scale). Entries that
  // vanish in the limit ε → 0⁺ shrink by the ratio 1e-3 between the runs; a row whose entries
  // all vanish is a row of zeros of the limit array (ε case followed by jω roots), which a
  // single numeric ε would miss. Without any ε substitution both runs are identical.
  const EPS = [1e-5, 1e-8];
  const runs: number[][][] = EPS.map(() => (n >= 1 ? [row0.slice(), row1.slice()] : [row0.slice()]));
  const epsilonRows: number[] = [];
  const auxByRun: RouthAuxiliary[][] = EPS.map(() => []);
  const rowScale = (r: readonly number[]) => r.reduce((m, x) => Math.max(m, Math.abs(x)), 0);
  const vanishes = (a: number, b: number) => (a === 0 && b === 0) || Math.abs(b) <= 0.03 * Math.abs(a);

  // Row 1 may itself be all zeros (e.g. s^4 + 5s^2 + 4): handle it like any later row.
  const fixRow = (i: number) => {
    const power = n - i;
    if (power < 0) return;
    const [ra, rb] = runs.map((rows) => rows[i]);
    const zeroRow = epsilonRows.length === 0 ? !ra.some((x) => x !== 0) : ra.every((x, j) => vanishes(x, rb[j]));
    runs.forEach((rows, q) => {
      const r = rows[i];
      if (zeroRow) {
        const above = rows[i - 1];
        const k = power + 1;
        // A(s) = Σ above[j]·s^(k − 2j); replace this row by A'(s): coefficient (k − 2j)·above[j].
        const aux = new Array<number>(k + 1).fill(0);
        above.forEach((x, j) => {
          if (k - 2 * j >= 0) aux[k - 2 * j] = x;
        });
        auxByRun[q].push({ row: i - 1, power: k, poly: trim(aux) });
        for (let j = 0; j < r.length; j++) r[j] = k - 2 * j > 0 ? (k - 2 * j) * (above[j] ?? 0) : 0;
      }
      if (r[0] === 0) {
        r[0] = EPS[q] * (rowScale(r.length > 1 ? r : rows[i - 1]) || 1);
        if (q === 0) epsilonRows.push(i);
      }
    });
  };
  if (n >= 1) fixRow(1);

  for (let i = 2; i <= n; i++) {
    for (const rows of runs) {
      const a = rows[i - 2];
      const b = rows[i - 1];
      const r = new Array<number>(width).fill(0);
      for (let j = 0; j < width - 1; j++) {
        const x = b[0] * (a[j + 1] ?? 0) - a[0] * (b[j + 1] ?? 0);
        const size = Math.abs(b[0] * (a[j + 1] ?? 0)) + Math.abs(a[0] * (b[j + 1] ?? 0));
        r[j] = Math.abs(x) <= 1e-12 * size ? 0 : x / b[0];
      }
      rows.push(r);
    }
    fixRow(i);
  }
  // Report the run nearer the limit; auxiliary polynomials from a row left untouched by ε are
  // the same in both runs.
  const rows = runs[1];
  const auxiliaries = auxByRun[1];

  const firstColumn = rows.map((r) => r[0]);
  const changesFrom = (start: number) => {
    let k = 0;
    for (let i = start + 1; i < firstColumn.length; i++) if (Math.sign(firstColumn[i]) !== Math.sign(firstColumn[i - 1])) k++;
    return k;
  };
  const signChanges = changesFrom(0);
  let jw = rootsAtOrigin;
  if (auxiliaries.length > 0) {
    const first = auxiliaries[0];
    jw += first.power - 2 * changesFrom(first.row);
  }
  const rhp = signChanges;
  const degree = n + rootsAtOrigin;
  return {
    array: rows,
    powers: rows.map((_, i) => n - i),
    firstColumn,
    signChanges,
    rhp,
    jw,
    lhp: degree - rhp - jw,
    epsilonRows,
    auxiliaries,
    auxiliary: auxiliaries.length ? auxiliaries[0].poly : null,
    rootsAtOrigin,
  };
}
