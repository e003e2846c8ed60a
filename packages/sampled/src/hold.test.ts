import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { expm, matrix } from 'mathjs';
import { type Complex, cadd, cdiv, cexp, cmul, cx, poly, realize, revalComplex, tevalComplex, tfFromCoefficients } from '@loopwright/lti';
import { discreteTransfer, dtFrequencyValue } from './discrete.ts';
import { holdEquivalent, holdStateSpace, splitDelay } from './hold.ts';
import { matchedPoleZero, tustin } from './tustin.ts';

const fd = poly.fromDescending;
const desc = (p: readonly number[]) => poly.toDescending(p);

/** e^M by mathjs (an independent implementation: mathjs' own Padé with scaling and squaring). */
const mathjsExpm = (M: number[][]): number[][] => (expm(matrix(M)).toArray() as number[][]).map((r) => r.slice());

describe('holdStateSpace against mathjs expm', () => {
  it('Φ, Γ0, Γ1 equal the blocks of mathjs expm of [[A, B],[0, 0]] over T − τ and τ', () => {
    const ss = realize({ num: [2, 1], den: fd([1, 0.7, 3.2, 1.5]) });
    const T = 0.3;
    const tau = 0.11;
    const hs = holdStateSpace(ss, T, tau);
    const aug = (h: number) => {
      const M = ss.A.map((row, i) => [...row.map((v) => v * h), ss.B[i] * h]);
      M.push([0, 0, 0, 0]);
      return mathjsExpm(M);
    };
    const E1 = aug(T - tau);
    const E2 = aug(tau);
    const E = mathjsExpm(ss.A.map((row) => row.map((v) => v * T)));
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) expect(Math.abs(hs.Phi[i][j] - E[i][j])).toBeLessThanOrEqual(1e-13);
      expect(Math.abs(hs.Gamma0[i] - E1[i][3])).toBeLessThanOrEqual(1e-13);
      const g1 = E1[i].slice(0, 3).reduce((s, v, k) => s + v * E2[k][3], 0);
      expect(Math.abs(hs.Gamma1[i] - g1)).toBeLessThanOrEqual(1e-13);
    }
    // Identity: Γ0 + Γ1 = ∫₀^T e^(As) ds B (the whole sample with no delay).
    const full = holdStateSpace(ss, T, 0);
    for (let i = 0; i < 3; i++) expect(Math.abs(hs.Gamma0[i] + hs.Gamma1[i] - full.Gamma0[i])).toBeLessThanOrEqual(1e-14);
  });
  it('rejects τ outside [0, T)', () => {
    const ss = realize({ num: [1], den: [1, 1] });
    expect(() => holdStateSpace(ss, 0.1, 0.1)).toThrow(/τ/);
    expect(() => holdStateSpace(ss, 0.1, -0.01)).toThrow(/τ/);
  });
});

/**
 * An independent hold equivalent for distinct, nonzero poles by partial fractions:
 * G(s)/s = c0/s + Σ rᵢ/(s − pᵢ), so Z{G/s} = c0·z/(z − 1) + Σ rᵢ·z/(z − e^(pᵢT)) and
 * H(z) = (z − 1)/z · Z{G/s} (Franklin, Powell & Workman, ch. 4 (from memory)). Evaluated at a point.
 */
function partialFractionHold(num: number[], den: number[], T: number, z: Complex): Complex {
  const poles = polesOf(den);
  const dden = poly.derivative(den);
  let sum = cmul(cx(poly.evalReal(num, 0) / poly.evalReal(den, 0)), cdiv(z, cadd(z, cx(-1))));
  for (const p of poles) {
    // residue of G(s)/s at p: N(p)/(p·D'(p))
    const r = cdiv(poly.evalComplex(num, p), cmul(p, poly.evalComplex(dden, p)));
    const zp = cexp(cx(p.re * T, p.im * T));
    sum = cadd(sum, cmul(r, cdiv(z, cadd(z, cx(-zp.re, -zp.im)))));
  }
  return cmul(sum, cdiv(cadd(z, cx(-1)), z));
}
function polesOf(den: number[]): Complex[] {
  // Test-only: quadratic factors given explicitly below keep this exact.
  const r: Complex[] = [];
  const d = poly.trim(den);
  if (d.length === 4 && d[0] === 6 && d[1] === 11 && d[2] === 6) return [cx(-1), cx(-2), cx(-3)];
  if (d.length === 3) {
    const [c, b, a] = d;
    const disc = b * b - 4 * a * c;
    const re = -b / (2 * a);
    const im = Math.sqrt(Math.abs(disc)) / (2 * a);
    return disc < 0 ? [cx(re, im), cx(re, -im)] : [cx(re + im), cx(re - im)];
  }
  return r;
}

describe('holdEquivalent: two independent methods agree', () => {
  it('partial fractions (distinct poles) and the matrix-exponential form give the same H(z) on and off the unit circle', () => {
    const cases: { num: number[]; den: number[]; T: number }[] = [
      { num: [6], den: [6, 11, 6, 1], T: 0.2 }, // 6/((s+1)(s+2)(s+3))
      { num: [5, 1], den: [4, 0.8, 1], T: 0.05 }, // (s+5)/(s² + 0.8s + 4), lightly damped
      { num: [2, 0.5], den: [6, 11, 6, 1], T: 1.3 },
    ];
    for (const c of cases) {
      const H = holdEquivalent(tfFromCoefficients(c.num, c.den), c.T);
      for (const z of [cx(Math.cos(0.7), Math.sin(0.7)), cx(-0.4, 1.3), cx(2, -0.5)]) {
        const a = revalComplex(H.rational, z);
        const b = partialFractionHold(c.num, c.den, c.T, z);
        expect(Math.hypot(a.re - b.re, a.im - b.im)).toBeLessThanOrEqual(1e-12 * (1 + Math.hypot(b.re, b.im)));
      }
    }
  });
  it('on the unit circle H(e^(jωT)) = (1/T)·Σₖ G(jωₖ)·(1 − e^(−jωₖT))/(jωₖ), ωₖ = ω + 2πk/T (aliasing sum)', () => {
    // Franklin, Powell & Workman, ch. 6 (from memory). G strictly proper of relative degree 2:
    // terms fall as 1/k³, so ±4000 terms reach ~1e-10.
    const G = tfFromCoefficients([3, 1], fd([1, 1.2, 4, 2]));
    const T = 0.4;
    const H = holdEquivalent(G, T, { computeDelay: 0.35 });
    const Gd = tfFromCoefficients([3, 1], fd([1, 1.2, 4, 2]), 0.35 * T);
    for (const w of [0.5, 2, 5.5]) {
      let s = cx(0);
      for (let k = -4000; k <= 4000; k++) {
        const wk = w + (2 * Math.PI * k) / T;
        const hold = cdiv(cx(1 - Math.cos(wk * T), Math.sin(wk * T)), cx(0, wk));
        s = cadd(s, cmul(tevalComplex(Gd, cx(0, wk)), hold));
      }
      s = cx(s.re / T, s.im / T);
      const h = dtFrequencyValue(H, w);
      expect(Math.hypot(h.re - s.re, h.im - s.im)).toBeLessThanOrEqual(1e-8);
    }
  });
  it('the static gain is kept: H(1) = G(0) for any T and delay (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.2, max: 5, noNaN: true }),
        fc.double({ min: 0.1, max: 3, noNaN: true }),
        fc.double({ min: 0.05, max: 2, noNaN: true }),
        fc.double({ min: 0, max: 1.7, noNaN: true }), // at most 34 samples of dead time (order limit 60)
        (a, b, T, theta) => {
          const H = holdEquivalent(tfFromCoefficients([a * b], fd([1, a + b, a * b]), theta), T);
          const g = poly.evalReal(H.rational.num, 1) / poly.evalReal(H.rational.den, 1);
          expect(Math.abs(g - 1)).toBeLessThanOrEqual(1e-9);
        },
      ),
    );
  });
  it('a biproper G keeps its direct feedthrough: (s + 2)/(s + 1) → H(∞) = 1, and with a fractional delay the feedthrough moves one sample', () => {
    const G = tfFromCoefficients([2, 1], [1, 1]);
    const H = holdEquivalent(G, 0.1);
    expect(Math.abs(poly.lead(H.rational.num) - 1)).toBeLessThanOrEqual(1e-14);
    const Hd = holdEquivalent(tfFromCoefficients([2, 1], [1, 1], 0.05), 0.1);
    expect(poly.degree(Hd.rational.num)).toBeLessThan(poly.degree(Hd.rational.den));
  });
  it('a whole-sample computation delay multiplies by z^(−1)', () => {
    const G = tfFromCoefficients([1], [0, 1, 1]);
    const H0 = holdEquivalent(G, 0.5);
    const H1 = holdEquivalent(G, 0.5, { computeDelay: 1 });
    expect(desc(H1.rational.num)).toEqual(desc(H0.rational.num));
    expect(desc(H1.rational.den)).toEqual([...desc(H0.rational.den), 0]);
  });
  it('bad input: improper G, bad sample time, bad computation delay', () => {
    expect(() => holdEquivalent(tfFromCoefficients([0, 0, 1], [1, 1]), 0.1)).toThrow(/improper/);
    expect(() => holdEquivalent(tfFromCoefficients([1], [1, 1]), 0)).toThrow(/sample time/);
    expect(() => holdEquivalent(tfFromCoefficients([1], [1, 1]), 0.1, { computeDelay: -1 })).toThrow(/computeDelay/);
    expect(() => holdEquivalent(tfFromCoefficients([1], [1, 1], 8), 0.1)).toThrow(/80 samples.*order 81/);
  });
  it('splitDelay snaps to whole samples and keeps fractions', () => {
    expect(splitDelay(0.3, 0.1)).toEqual({ samples: 3, fraction: 0 });
    const s = splitDelay(0.35, 0.1);
    expect(s.samples).toBe(3);
    expect(Math.abs(s.fraction - 0.05)).toBeLessThanOrEqual(1e-15);
  });
});

describe('matched pole–zero and Tustin', () => {
  it('1/(s + 1): zero at −1 and low-frequency gain kept: K = (1 − e^(−T))/2; keeping one sample of delay gives the hold equivalent', () => {
    // Franklin, Powell & Workman, ch. 6 (from memory); derived here.
    const T = 0.3;
    const e = Math.exp(-T);
    const H = matchedPoleZero(tfFromCoefficients([1], [1, 1]), T);
    const want = [(1 - e) / 2, (1 - e) / 2];
    desc(H.rational.num).forEach((c, i) => expect(Math.abs(c - want[i])).toBeLessThanOrEqual(1e-15));
    const H1 = matchedPoleZero(tfFromCoefficients([1], [1, 1]), T, { keepOneSampleDelay: true });
    const Z = holdEquivalent(tfFromCoefficients([1], [1, 1]), T);
    expect(Math.abs(H1.rational.num[0] - Z.rational.num[0])).toBeLessThanOrEqual(1e-15);
    expect(Math.abs(H1.rational.den[0] - Z.rational.den[0])).toBeLessThanOrEqual(1e-15);
  });
  it('an integrator 1/s maps to (T/2)(z + 1)/(z − 1), the trapezoidal rule (Tustin gives the same)', () => {
    const T = 0.25;
    for (const H of [matchedPoleZero(tfFromCoefficients([1], [0, 1]), T), tustin(tfFromCoefficients([1], [0, 1]), T)]) {
      expect(desc(H.rational.num)).toEqual([T / 2, T / 2]);
      expect(desc(H.rational.den)).toEqual([1, -1]);
    }
  });
  it('Tustin maps the stable left half-plane into the unit circle (poles stay stable) and keeps the static gain', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.05, max: 20, noNaN: true }),
        fc.double({ min: 0.05, max: 0.99, noNaN: true }),
        fc.double({ min: 0.001, max: 2, noNaN: true }),
        (wn, zeta, T) => {
          const G = tfFromCoefficients([wn * wn], [wn * wn, 2 * zeta * wn, 1]);
          const H = tustin(G, T);
          const g1 = poly.evalReal(H.rational.num, 1) / poly.evalReal(H.rational.den, 1);
          // The coefficients in z hold terms of size (2/T)² next to ωn²: H(1) is known to eps·(2/(ωnT))².
          expect(Math.abs(g1 - 1)).toBeLessThanOrEqual(1e-13 * (1 + (2 / (wn * T)) ** 2));
          const den = desc(H.rational.den);
          // Jury for z² + a1 z + a0: |a0| < 1, 1 + a1 + a0 > 0, 1 − a1 + a0 > 0.
          expect(Math.abs(den[2])).toBeLessThan(1);
          expect(1 + den[1] + den[2]).toBeGreaterThan(0);
          expect(1 - den[1] + den[2]).toBeGreaterThan(0);
        },
      ),
    );
  });
  it('a dead time that is not a whole number of samples is refused by Tustin and matched (named, with the way out)', () => {
    const G = tfFromCoefficients([1], [1, 1], 0.15);
    expect(() => tustin(G, 0.1)).toThrow(/zero-order-hold/);
    expect(() => matchedPoleZero(G, 0.1)).toThrow(/zero-order-hold/);
    const H = tustin(tfFromCoefficients([1], [1, 1], 0.2), 0.1);
    expect(poly.degree(H.rational.den)).toBe(3);
  });
  it('discreteTransfer refuses a non-causal H(z)', () => {
    expect(() => discreteTransfer([0, 0, 1], [1, 1], 0.1)).toThrow(/not causal/);
  });
});
