import { describe, expect, it } from 'vitest';
import { poly, polyRoots, routhHurwitz } from '@loopwright/lti';

// Routh–Hurwitz reference rows R10–R16. Polynomials are typed highest power first, as printed
// in the books, and converted with poly.fromDescending.
const routh = (desc: number[]) => routhHurwitz(poly.fromDescending(desc));

describe('Routh–Hurwitz array against textbook examples', () => {
  it('R10: 1000/((s+2)(s+3)(s+5)) in unity feedback → s³ + 10s² + 31s + 1030', () => {
    // Characteristic polynomial rebuilt from the loop, not typed: (s+2)(s+3)(s+5) + 1000.
    const chi = poly.add(poly.mul(poly.mul([2, 1], [3, 1]), [5, 1]), [1000]);
    expect(chi).toEqual(poly.fromDescending([1, 10, 31, 1030]));
    const r = routhHurwitz(chi);
    // Nise, Control Systems Engineering, 6th ed., Sec. 6.2, Example 6.1 (from memory) [R10]
    expect(r.firstColumn).toEqual([1, 10, -72, 1030]);
    expect([r.rhp, r.jw, r.lhp]).toEqual([2, 0, 1]);
  });

  it('R11: zero first element in the s³ row, ε method', () => {
    const r = routh([1, 2, 3, 6, 5, 3]);
    // Nise, Sec. 6.3, Example 6.2 (from memory) [R11]
    expect(r.epsilonRows).toEqual([2]); // row of s³
    expect(r.powers[2]).toBe(3);
    expect([r.rhp, r.jw, r.lhp]).toEqual([2, 0, 3]);
  });

  it('R12: s³ − 3s + 2 = (s − 1)²(s + 2), zero first element in the s² row', () => {
    const r = routh([1, 0, -3, 2]);
    // Ogata, Modern Control Engineering, 5th ed., Sec. 5-6, special cases (from memory) [R12]
    expect(r.epsilonRows).toEqual([1]);
    expect([r.rhp, r.jw, r.lhp]).toEqual([2, 0, 1]);
  });

  it('R13: row of zeros in the s³ row, auxiliary 7s⁴ + 42s² + 56', () => {
    const r = routh([1, 7, 6, 42, 8, 56]);
    // Nise, Sec. 6.3, Example 6.4 (from memory) [R13]
    expect(r.auxiliary).toEqual(poly.fromDescending([7, 0, 42, 0, 56]));
    expect([r.rhp, r.jw, r.lhp]).toEqual([0, 4, 1]);
    // The auxiliary polynomial's roots are the jω-axis roots ±j√2, ±2j.
    const im = polyRoots(r.auxiliary!)
      .map((z) => Math.abs(z.im))
      .sort((a, b) => a - b);
    const want = [Math.SQRT2, Math.SQRT2, 2, 2];
    im.forEach((v, i) => expect(Math.abs(v - want[i])).toBeLessThanOrEqual(1e-4));
    for (const z of polyRoots(r.auxiliary!)) expect(Math.abs(z.re)).toBeLessThanOrEqual(1e-4);
  });

  it('R14: (s − 1)(s + 1)(s + 2)(s² + 25), auxiliary 2s⁴ + 48s² − 50', () => {
    const r = routh([1, 2, 24, 48, -25, -50]);
    // Ogata, Sec. 5-6, special cases (from memory) [R14]
    expect(r.auxiliary).toEqual(poly.fromDescending([2, 0, 48, 0, -50]));
    expect([r.rhp, r.jw, r.lhp]).toEqual([1, 2, 2]);
  });

  it('R15: eighth order, row of zeros in the s³ row, auxiliary 10s⁴ + 30s² + 20', () => {
    const r = routh([1, 1, 12, 22, 39, 59, 48, 38, 20]);
    // Nise, Sec. 6.3, Example 6.5 (from memory) [R15]; a book may print a positively scaled row.
    const aux = r.auxiliary!;
    const ref = poly.fromDescending([10, 0, 30, 0, 20]);
    const k = aux[4] / ref[4];
    expect(k).toBeGreaterThan(0);
    aux.forEach((c, i) => expect(Math.abs(c - k * ref[i])).toBeLessThanOrEqual(1e-9 * Math.abs(k)));
    expect([r.rhp, r.jw, r.lhp]).toEqual([2, 4, 2]);
    // The RHP pair 0.5 ± 3.1225j, from the roots (independent of the array).
    const rhpRoots = polyRoots(poly.fromDescending([1, 1, 12, 22, 39, 59, 48, 38, 20])).filter((z) => z.re > 1e-3);
    expect(rhpRoots.length).toBe(2);
    for (const z of rhpRoots) {
      expect(Math.abs(z.re - 0.5)).toBeLessThanOrEqual(1e-4);
      expect(Math.abs(Math.abs(z.im) - Math.sqrt(39) / 2)).toBeLessThanOrEqual(1e-4); // s² − s + 10
    }
  });

  it('R16: K/(s(s+7)(s+11)) → stable for 0 < K < 1386, ω = √77 at the limit', () => {
    const chi = (K: number) => poly.add(poly.mul(poly.mul([0, 1], [7, 1]), [11, 1]), [K]);
    // Nise, Sec. 6.4, Example 6.9 (from memory) [R16]
    expect(routhHurwitz(chi(1385)).rhp).toBe(0);
    expect(routhHurwitz(chi(1385)).lhp).toBe(3);
    expect(routhHurwitz(chi(1387)).rhp).toBe(2);
    expect(routhHurwitz(chi(1)).rhp).toBe(0);
    expect(routhHurwitz(chi(-1)).rhp).toBe(1); // s⁰ row K < 0
    const limit = routhHurwitz(chi(1386));
    expect([limit.rhp, limit.jw, limit.lhp]).toEqual([0, 2, 1]);
    // s¹ row (1386 − K)/18 vanishes exactly; auxiliary 18s² + 1386 gives ω = √77.
    expect(limit.auxiliary).toEqual([1386, 0, 18]);
    const w = Math.sqrt(limit.auxiliary![0] / limit.auxiliary![2]);
    expect(Math.abs(w - Math.sqrt(77))).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(w - 8.775)).toBeLessThanOrEqual(1e-4);
  });
});
