import { describe, expect, it } from 'vitest';
import { cabs, carg, cx, padeDelay, padePhase, polyRoots, revalComplex, revalReal } from '@loopwright/lti';

// Padé approximants of the dead time e^(−sT), rows R31–R32 (R33 is in lti-core-response).
// Source: Padé approximant of the exponential, e.g. Golub & Van Loan, Matrix Computations,
// 4th ed., Sec. 9.3.1 (from memory); values derived in the reference table.
const deg = 180 / Math.PI;

describe('Padé approximants of e^(−sT)', () => {
  it('R31: (1,1) is (1 − 0.5Ts)/(1 + 0.5Ts); T = 2 gives (1 − s)/(1 + s)', () => {
    const T = 0.8;
    const p = padeDelay(T, 1);
    // Normalise to D(0) = 1 to compare with the series-matched coefficients.
    const k = 1 / p.den[0];
    expect(p.num.map((c) => c * k)).toEqual([1, -0.5 * T]);
    expect(p.den.map((c) => c * k)).toEqual([1, 0.5 * T]);
    const p2 = padeDelay(2, 1);
    expect(p2.num).toEqual([1, -1]);
    expect(p2.den).toEqual([1, 1]);
  });

  it('R31: error P − e^(−x) ≈ −x³/12 for small x; all-pass; phase −53.130° at ωT = 1', () => {
    const p = padeDelay(1, 1);
    for (const x of [1e-2, 2e-2]) {
      const err = revalReal(p, x) - Math.exp(-x);
      // Next term of the series (−x⁴/24 relative contribution) bounds the deviation.
      expect(Math.abs(err / x ** 3 + 1 / 12)).toBeLessThanOrEqual(x);
    }
    for (const w of [0.1, 1, 7]) expect(Math.abs(cabs(revalComplex(p, cx(0, w))) - 1)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs(carg(revalComplex(p, cx(0, 1))) * deg - -53.13)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(padePhase(1, 1, 1) * deg - -53.13)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(-1 * deg - -57.296)).toBeLessThanOrEqual(1e-3); // the true delay's phase, −1 rad
  });

  it('R32: (2,2) coefficients 1 ∓ 0.5Ts + (Ts)²/12, error +x⁵/720, phase −57.221°, poles −3 ± j√3 at T = 1', () => {
    const T = 1.7;
    const p = padeDelay(T, 2);
    const k = 1 / p.den[0];
    const n = p.num.map((c) => c * k);
    const d = p.den.map((c) => c * k);
    const want = [1, 0.5 * T, (T * T) / 12];
    want.forEach((w, i) => {
      expect(Math.abs(d[i] - w)).toBeLessThanOrEqual(1e-15 * Math.max(1, w));
      expect(Math.abs(n[i] - (i % 2 ? -w : w))).toBeLessThanOrEqual(1e-15 * Math.max(1, w));
    });
    expect(Math.abs(d[2] / (T * T) - 0.083333)).toBeLessThanOrEqual(1e-6);
    const p1 = padeDelay(1, 2);
    for (const x of [0.05, 0.1]) {
      const err = revalReal(p1, x) - Math.exp(-x);
      expect(Math.abs(err / x ** 5 - 1 / 720)).toBeLessThanOrEqual(x / 100);
    }
    expect(Math.abs(padePhase(1, 2, 1) * deg - -57.221)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(carg(revalComplex(p1, cx(0, 1))) * deg - -57.221)).toBeLessThanOrEqual(1e-3);
    const poles = polyRoots(p1.den);
    for (const z of poles) {
      expect(Math.abs(z.re + 3)).toBeLessThanOrEqual(1e-4);
      expect(Math.abs(Math.abs(z.im) - Math.sqrt(3))).toBeLessThanOrEqual(1e-4);
    }
  });
});
