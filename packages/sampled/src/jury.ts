import { InputError, MAX_ORDER, assertFinite, poly as P, routhHurwitz } from '@loopwright/lti';

/** One condition of the Jury test with the two sides compared. */
export interface JuryCondition {
  /** e.g. "|a_n| < a_0", "P(1) > 0", "|b_(n−1)| > |b_0|". */
  label: string;
  left: number;
  right: number;
  holds: boolean;
}

export interface JuryResult {
  /** Every root strictly inside the unit circle ⇔ every condition holds strictly. */
  stable: boolean;
  conditions: JuryCondition[];
  /** The reduced rows b, c, …, q (each as Jury prints it: index 0 first). */
  rows: number[][];
}

/**
 * Jury's stability test for P(z) = a_0·z^n + a_1·z^(n−1) + … + a_n (given here with ASCENDING
 * coefficients, as every polynomial in Loopwright), a_0 > 0 after a sign change if needed:
 * |a_n| < a_0, P(1) > 0, (−1)^n·P(−1) > 0, and for the rows
 * b_k = a_n·a_(k+1) − a_(n−1−k)·a_0, c_k = b_(n−1)·b_(k+1) − b_(n−2−k)·b_0, …:
 * |b_(n−1)| > |b_0|, |c_(n−2)| > |c_0|, … down to the row of three (Jury, Theory and
 * Application of the z-Transform Method, 1964; the table as in Ogata, Discrete-Time Control
 * Systems, 2nd ed., Sec. 4-3 (from memory)).
 */
export function juryTest(p: readonly number[]): JuryResult {
  assertFinite(p, 'characteristic polynomial');
  const t = P.trim(p);
  if (t.length === 0) throw new InputError('the zero polynomial has no Jury test');
  if (t.length - 1 > MAX_ORDER) throw new InputError(`polynomial of degree ${t.length - 1} is above the limit of ${MAX_ORDER}`);
  const n = t.length - 1;
  const sgn = t[n] < 0 ? -1 : 1;
  const a = t.map((c) => c * sgn).reverse(); // Jury's a_0 … a_n (descending powers)
  const conditions: JuryCondition[] = [];
  const rows: number[][] = [];
  if (n === 0) return { stable: true, conditions, rows };
  const p1 = a.reduce((s, c) => s + c, 0);
  const pm1 = a.reduce((s, c, i) => s + c * (-1) ** (n - i), 0);
  conditions.push({ label: '|a_n| < a_0', left: Math.abs(a[n]), right: a[0], holds: Math.abs(a[n]) < a[0] });
  conditions.push({ label: 'P(1) > 0', left: p1, right: 0, holds: p1 > 0 });
  conditions.push({ label: '(−1)^n·P(−1) > 0', left: (-1) ** n * pm1, right: 0, holds: (-1) ** n * pm1 > 0 });
  let row = a; // descending, row[0] is the larger end
  const letters = 'bcdefghijklmnopqrstuvwxyz';
  for (let step = 0; row.length - 1 >= 3; step++) {
    const m = row.length - 1;
    const next: number[] = [];
    for (let k = 0; k < m; k++) next.push(row[m] * row[k + 1] - row[m - 1 - k] * row[0]);
    rows.push(next);
    const L = letters[step % letters.length];
    const hi = Math.abs(next[m - 1]);
    const lo = Math.abs(next[0]);
    conditions.push({ label: `|${L}_${m - 1}| > |${L}_0|`, left: hi, right: lo, holds: hi > lo });
    row = next.slice().reverse();
  }
  return { stable: conditions.every((c) => c.holds), conditions, rows };
}

/**
 * Counts roots inside, on and outside the unit circle, by the bilinear map z = (1 + w)/(1 − w)
 * (|z| < 1 ⇔ Re w < 0) and the Routh–Hurwitz array of the mapped polynomial; a root at z = −1
 * maps to w = ∞ and is counted on the circle. An independent check of the Jury test.
 */
export function unitCircleRootCount(p: readonly number[]): { inside: number; on: number; outside: number } {
  assertFinite(p, 'characteristic polynomial');
  const t = P.trim(p);
  if (t.length === 0) throw new InputError('the zero polynomial has no roots to count');
  const n = t.length - 1;
  let q: number[] = [];
  for (let i = 0; i <= n; i++) q = P.add(q, P.scale(P.mul(P.pow([1, 1], i), P.pow([1, -1], n - i)), t[i]));
  const deg = P.trim(q, 1e-14).length - 1;
  const qt = P.trim(q, 1e-14);
  const r = deg > 0 ? routhHurwitz(qt) : { lhp: 0, jw: 0, rhp: 0 };
  return { inside: r.lhp, on: r.jw + (n - Math.max(deg, 0)), outside: r.rhp };
}
