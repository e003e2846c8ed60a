// Root-locus geometry against textbook worked examples (values recomputed independently; see
// each row's source). Polynomials are written highest power first as in the books and
// converted with poly.fromDescending.
import { describe, expect, it } from 'vitest';
import { type Complex, cabs, cx, poly, rootLocus, type RootLocus } from '@loopwright/lti';

const fd = poly.fromDescending;
const near = (a: number, b: number, tol: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(tol);
const sortAngles = (a: number[]) => a.slice().sort((x, y) => x - y);

/** The traced branch point that equals s exactly, at gain k (special points are trace members). */
function member(L: RootLocus, s: Complex, k: number): boolean {
  return L.branches.some((br) => br.some((p) => p.k === k && p.s.re === s.re && p.s.im === s.im));
}

describe('R01–R03: K/(s(s+1)(s+2))', () => {
  const den = fd([1, 3, 2, 0]);
  const L = rootLocus([1], den);

  it('R01 asymptotes and real-axis parts', () => {
    // Ogata, Sec. 6-2, Example 6-1 (from memory) [R01]: σa = −1; angles 60°, 180°, −60°; locus on [−1, 0] and (−∞, −2].
    near(L.asymptotes.centroid!, -1, 1e-9);
    const angles = sortAngles(L.asymptotes.anglesDeg);
    [-60, 60, 180].forEach((a, i) => near(angles[i], a, 1e-6));
    expect(L.realAxisSegments).toHaveLength(2);
    expect(L.realAxisSegments[0].from).toBe(-Infinity);
    near(L.realAxisSegments[0].to, -2, 1e-9);
    near(L.realAxisSegments[1].from, -1, 1e-9);
    near(L.realAxisSegments[1].to, 0, 1e-9);
  });

  it('R02 breakaway s = −1 + 1/√3 with K = 0.3849; the other root belongs to K < 0', () => {
    // Ogata, Example 6-1 (from memory) [R02]: 3s² + 6s + 2 = 0.
    expect(L.breakaways).toHaveLength(1);
    const b = L.breakaways[0];
    near(b.s.re, -1 + 1 / Math.sqrt(3), 1e-9);
    expect(b.s.im).toBe(0);
    near(b.gain, 0.3849, 1e-4);
    // K = −s(s+1)(s+2) at the exact root.
    const s = -1 + 1 / Math.sqrt(3);
    near(b.gain, -s * (s + 1) * (s + 2), 1e-12);
    expect(member(L, b.s, b.gain)).toBe(true);
    const Ln = rootLocus([1], den, { negative: true });
    expect(Ln.breakaways).toHaveLength(1);
    near(Ln.breakaways[0].s.re, -1.5774, 1e-4);
    near(Ln.breakaways[0].gain, -0.3849, 1e-4);
  });

  it('R03 jω crossing K = 6 at ω = √2', () => {
    // Ogata, Example 6-1 (from memory) [R03]: Routh s¹ row (6 − K)/3 = 0, auxiliary 3s² + K = 0.
    const c = L.crossings.filter((x) => x.omega > 0);
    expect(c).toHaveLength(1);
    near(c[0].gain, 6, 1e-9);
    near(c[0].omega, Math.SQRT2, 1e-12);
    expect(member(L, cx(0, c[0].omega), c[0].gain)).toBe(true);
    expect(member(L, cx(0, -c[0].omega), c[0].gain)).toBe(true);
    // Stable for 0 < K < 6: every traced pole is in the open LHP below K = 6 and two are in the RHP above.
    for (const br of L.branches) for (const p of br) if (p.k > 0 && p.k < 5.999) expect(p.s.re).toBeLessThan(0);
    const above = L.branches.map((br) => br.find((p) => p.k > 6.5)!).filter((p) => p.s.re > 0);
    expect(above).toHaveLength(2);
  });
});

describe('R04: K(s+2)/(s²+2s+3)', () => {
  const L = rootLocus([2, 1], [3, 2, 1]);
  it('departure angle 144.74° (book: 145°), break-in −2 − √3 with K = 5.4641, branches on a circle of radius √3 about −2', () => {
    // Ogata, Sec. 6-2, Example 6-2 (from memory) [R04].
    const d = L.departures.find((x) => x.at.im > 0)!;
    near(d.at.re, -1, 1e-12);
    near(d.at.im, Math.SQRT2, 1e-12);
    near(d.angleDeg, 144.74, 0.01);
    near(d.angleDeg, 145, 1); // book value
    // Closed form: 180° − 90° + atan(√2) (angle from the zero) = 90° + 54.7356°.
    near(d.angleDeg, 90 + (Math.atan(Math.SQRT2) * 180) / Math.PI, 1e-9);
    expect(L.breakaways).toHaveLength(1);
    near(L.breakaways[0].s.re, -2 - Math.sqrt(3), 1e-9);
    near(L.breakaways[0].gain, 5.4641, 1e-4);
    near(L.breakaways[0].gain, 2 + 2 * Math.sqrt(3), 1e-9); // −D/N at −2 − √3
    // Every complex closed-loop pole lies on |s + 2| = √3.
    let complexPoints = 0;
    for (const br of L.branches) {
      for (const p of br) {
        if (Math.abs(p.s.im) > 1e-9) {
          complexPoints++;
          near(cabs(cx(p.s.re + 2, p.s.im)), Math.sqrt(3), 1e-6);
        }
      }
    }
    expect(complexPoints).toBeGreaterThan(50);
  });
});

describe('R05: K(s+3)/(s(s+1)(s+2)(s+4))', () => {
  const den = poly.mul(poly.mul([0, 1], [1, 1]), poly.mul([2, 1], [4, 1]));
  const L = rootLocus([3, 1], den);
  it('asymptotes σa = −4/3, angles ±60°, 180°; crossing K = 9.6456 at ω = 1.5877 (book: 9.65, 1.59)', () => {
    // Nise, Sec. 8.5, Examples 8.1 and 8.4 (from memory; example numbers uncertain) [R05].
    near(L.asymptotes.centroid!, -4 / 3, 1e-9);
    const angles = sortAngles(L.asymptotes.anglesDeg);
    [-60, 60, 180].forEach((a, i) => near(angles[i], a, 1e-6));
    const c = L.crossings.filter((x) => x.omega > 0);
    expect(c).toHaveLength(1);
    near(c[0].gain, 9.6456, 1e-4);
    near(c[0].omega, 1.5877, 1e-4);
    near(c[0].gain, 9.65, 0.01);
    near(c[0].omega, 1.59, 0.01);
    // Closed forms from the Routh row: K² + 65K − 720 = 0 and ω² = 3K·7/(90 − K).
    const K = (-65 + Math.sqrt(65 * 65 + 4 * 720)) / 2;
    near(c[0].gain, K, 1e-9);
    near(c[0].omega, Math.sqrt((21 * K) / (90 - K)), 1e-9);
  });
});

describe('R06: K(s−3)(s−5)/((s+1)(s+2))', () => {
  const L = rootLocus(fd([1, -8, 15]), fd([1, 3, 2]));
  it('breakaway −1.4530 (K = 0.0086), break-in 3.8166 (K = 28.991), crossing K = 3/8 at ω = 2.3549', () => {
    // Nise, Sec. 8.5, Example 8.2 (from memory) [R06]; crossing derived in the reference table.
    expect(L.breakaways).toHaveLength(2);
    const [b1, b2] = L.breakaways.slice().sort((a, b) => a.s.re - b.s.re);
    near(b1.s.re, -1.453, 1e-4);
    near(b1.gain, 0.0086, 1e-4);
    near(b2.s.re, 3.8166, 1e-4);
    near(b2.gain, 28.991, 1e-3);
    near(b1.s.re, -1.45, 0.01);
    near(b2.s.re, 3.82, 0.01);
    // Exact: roots of 11s² − 26s − 61 = 0.
    near(b1.s.re, (26 - Math.sqrt(26 * 26 + 4 * 11 * 61)) / 22, 1e-12);
    near(b2.s.re, (26 + Math.sqrt(26 * 26 + 4 * 11 * 61)) / 22, 1e-12);
    const c = L.crossings.filter((x) => x.omega > 0);
    expect(c).toHaveLength(1);
    near(c[0].gain, 0.375, 1e-12);
    near(c[0].omega, 2.3549, 1e-4);
    near(c[0].omega, Math.sqrt((2 + 15 * 0.375) / (1 + 0.375)), 1e-12); // from (1+K)s² + (2+15K) at K = 3/8
    expect(L.asymptotes.centroid).toBeNull();
  });
});

describe('R07: K(s+2)/((s+3)(s²+2s+2))', () => {
  it('departure angle from −1 + j is 108.43° (book prints −251.57°)', () => {
    // Nise, Sec. 8.6, Example 8.5 (from memory) [R07].
    const L = rootLocus([2, 1], poly.mul([3, 1], [2, 2, 1]));
    const d = L.departures.find((x) => x.at.im > 0)!;
    near(d.at.re, -1, 1e-12);
    near(d.at.im, 1, 1e-12);
    near(d.angleDeg, 108.43, 0.01);
    near(d.angleDeg - 360, -251.57, 0.01);
    const dn = L.departures.find((x) => x.at.im < 0)!;
    near(dn.angleDeg, -108.43, 0.01); // conjugate symmetry
  });
});

describe('R08–R09: K/(s(s+4)(s²+4s+20))', () => {
  const den = poly.mul([0, 4, 1], [20, 4, 1]);
  const L = rootLocus([1], den);
  it('R08 asymptotes σa = −2, ±45°, ±135°; three breakaways −2 (K = 64) and −2 ± j√6 (K = 100)', () => {
    // Ogata, Ch. 6, root-locus example with this plant (from memory) [R08].
    near(L.asymptotes.centroid!, -2, 1e-9);
    const angles = sortAngles(L.asymptotes.anglesDeg);
    [-135, -45, 45, 135].forEach((a, i) => near(angles[i], a, 1e-6));
    expect(L.breakaways).toHaveLength(3);
    const real = L.breakaways.find((b) => b.s.im === 0)!;
    near(real.s.re, -2, 1e-4);
    near(real.gain, 64, 1e-6);
    const cplx = L.breakaways.filter((b) => b.s.im !== 0).sort((a, b) => a.s.im - b.s.im);
    expect(cplx).toHaveLength(2);
    for (const [b, sign] of [
      [cplx[0], -1],
      [cplx[1], 1],
    ] as const) {
      near(b.s.re, -2, 1e-4);
      near(b.s.im, sign * Math.sqrt(6), 1e-4);
      near(b.gain, 100, 1e-6);
      expect(member(L, b.s, b.gain)).toBe(true);
    }
    expect(member(L, real.s, real.gain)).toBe(true);
  });
  it('R09 crossing K = 260 at ω = √10; departure from −2 + j4 is −90°', () => {
    // Ogata, Ch. 6, same example as R08 (from memory) [R09]: Routh s¹ row (2080 − 8K)/26, auxiliary 26s² + K.
    const c = L.crossings.filter((x) => x.omega > 0);
    expect(c).toHaveLength(1);
    near(c[0].gain, 260, 1e-6);
    near(c[0].omega, Math.sqrt(10), 1e-9);
    const d = L.departures.find((x) => x.at.im > 0)!;
    near(d.at.im, 4, 1e-9);
    near(d.angleDeg, -90, 0.01);
  });
});
