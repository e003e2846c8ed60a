import { describe, expect, it } from 'vitest';
import { cx } from './complex.ts';
import { InputError } from './errors.ts';
import { frequencyEvaluator } from './frequency.ts';
import * as P from './poly.ts';
import { loopMargins } from './margins.ts';
import { tfFromCoefficients } from './transfer.ts';

describe('loopMargins: conditionally stable loop (lower gain margin)', () => {
  // L = 10K(s+1)²/(s³(s+10)): characteristic s⁴ + 10s³ + 10Ks² + 20Ks + 10K. Routh (by hand,
  // Routh–Hurwitz as in Ogata Sec. 5-6 (from memory)): rows 1,10K,10K / 10,20K / 8K,10K /
  // 20K − 12.5 / 10K ⇒ stable iff K > 0.625, with the s¹ row vanishing at K = 0.625 and the
  // auxiliary 8K·s² + 10K = 0 giving ω = √1.25.
  const K = 2;
  const L = tfFromCoefficients(P.scale(P.pow([1, 1], 2), 10 * K), P.mul([0, 0, 0, 1], [10, 1]));
  const m = loopMargins(L);
  it('reports the lower gain margin 0.625/K at ω = √1.25 and no upper one', () => {
    expect(m.closedLoopStable).toBe(true);
    expect(m.lowerGainMargin!).toBeCloseTo(0.625 / K, 10);
    expect(m.lowerPhaseCrossover!).toBeCloseTo(Math.sqrt(1.25), 10);
    expect(m.lowerGainMarginDb!).toBeCloseTo(20 * Math.log10(0.625 / K), 8);
    expect(m.gainMargin).toBeNull();
    expect(m.gainMarginDb).toBeNull();
  });
  it('lowering the gain below the lower margin destabilises the loop (closed-loop poles)', () => {
    const below = loopMargins(tfFromCoefficients(P.scale(P.pow([1, 1], 2), 10 * 0.6), P.mul([0, 0, 0, 1], [10, 1])));
    expect(below.closedLoopStable).toBe(false);
  });
});

describe('loopMargins: several gain crossovers', () => {
  // L = 0.5/s · 100/(s² + 0.2s + 100): |L| = 1 near 0.5 rad/s, and the resonance at 10 rad/s
  // (peak |L| ≈ 0.05·50 = 2.5) crosses 1 twice more.
  const L = tfFromCoefficients([50], P.mul([0, 1], [100, 0.2, 1]));
  const m = loopMargins(L);
  it('finds all three, matching a brute-force scan of |L(jω)| − 1 on a very fine grid', () => {
    const g = frequencyEvaluator(L);
    const brute: number[] = [];
    let prev = g(0.01).mag - 1;
    for (let i = 1; i <= 400000; i++) {
      const w = 0.01 * 10 ** (i / 100000);
      const v = g(w).mag - 1;
      if (v > 0 !== prev > 0) brute.push(w);
      prev = v;
    }
    expect(brute).toHaveLength(3);
    expect(m.gainCrossovers).toHaveLength(3);
    m.gainCrossovers.forEach((w, i) => expect(Math.abs(w - brute[i]) / w).toBeLessThan(1e-4));
    for (const w of m.gainCrossovers) expect(Math.abs(g(w).mag - 1)).toBeLessThan(1e-12);
    // The reported phase margin is the worst of the three.
    expect(m.phaseMarginDeg).toBe(Math.min(...m.gainCrossoverDetails.map((c) => c.phaseMarginDeg)));
  });
  it('closed-loop verdict comes from the poles, not from the margins', () => {
    // Roots of D + N by hand-independent check: the sign of the real parts must agree with the verdict.
    expect(m.closedLoopPoles).toHaveLength(3);
    expect(m.closedLoopStable).toBe(m.closedLoopPoles.every((p) => p.re < 0));
  });
});

describe('loopMargins: delay margin', () => {
  it('adding exactly the delay margin brings the phase margin to 0 (within rounding)', () => {
    const base = tfFromCoefficients([4], P.fromRoots([cx(-1), cx(-1), cx(-1)]));
    const m = loopMargins(base);
    const withDelay = loopMargins({ ...base, delay: m.delayMargin! });
    expect(Math.abs(withDelay.phaseMarginDeg!)).toBeLessThan(1e-7);
    expect(withDelay.gainCrossover!).toBeCloseTo(m.gainCrossover!, 12); // |L| does not see the delay
  });
});

describe('loopMargins: a gain crossover reached with phase lead', () => {
  // L = 4s/((s + 1)(0.01s + 1)): closed loop 0.01s² + 5.01s + 1, stable (both coefficients of one
  // sign). |L| = 1 first near ω ≈ 0.25 with ∠L ≈ +76° (a lead), then near ω ≈ 400. Dead time only
  // adds lag, so at each crossover the delay that reaches −1 is ((180° + ∠L) mod 360°)/ω — checked
  // here against the definition: with that delay, L(jω)·e^(−jωT) = −1 (derived here).
  const L = tfFromCoefficients([0, 4], P.mul([1, 1], [1, 0.01]));
  const m = loopMargins(L);
  it('reports a positive delay margin for every crossover of a stable loop', () => {
    expect(m.closedLoopStable).toBe(true);
    expect(m.gainCrossoverDetails).toHaveLength(2);
    const ev = frequencyEvaluator(L);
    for (const c of m.gainCrossoverDetails) {
      expect(c.delayMargin).toBeGreaterThan(0);
      const v = ev(c.omega);
      const rot = -c.omega * c.delayMargin;
      const re = v.re * Math.cos(rot) - v.im * Math.sin(rot);
      const im = v.re * Math.sin(rot) + v.im * Math.cos(rot);
      expect(Math.hypot(re + 1, im)).toBeLessThan(1e-6);
    }
    expect(m.delayMargin).toBe(Math.min(...m.gainCrossoverDetails.map((c) => c.delayMargin)));
  });
  it('the closed loop is stable just below the delay margin and unstable just above (Padé poles)', () => {
    expect(loopMargins({ ...L, delay: 0.98 * m.delayMargin! }).closedLoopStable).toBe(true);
    expect(loopMargins({ ...L, delay: 1.02 * m.delayMargin! }).closedLoopStable).toBe(false);
  });
});

describe('loopMargins: edge cases', () => {
  it('a loop that never reaches |L| = 1 has no phase margin; a first-order loop has no phase crossover', () => {
    const m = loopMargins(tfFromCoefficients([0.5], [1, 1]));
    expect(m.phaseMarginDeg).toBeNull();
    expect(m.gainCrossover).toBeNull();
    expect(m.delayMargin).toBeNull();
    expect(m.gainMargin).toBeNull(); // infinite
    expect(m.closedLoopStable).toBe(true);
    expect(m.bandwidth!).toBeCloseTo(1.5, 6); // T = 0.5/(s + 1.5): −3 dB at 1.5 rad/s
  });
  it('rejects a bad Padé order', () => {
    expect(() => loopMargins(tfFromCoefficients([1], [1, 1], 1), { padeOrder: 0 })).toThrow(InputError);
    expect(() => loopMargins(tfFromCoefficients([1], [1, 1], 1), { padeOrder: 2.5 })).toThrow(/Padé order/);
  });
  it('reports the Padé order it used and obeys an explicit one', () => {
    const m = loopMargins(tfFromCoefficients([1], [1, 1], 0.5), { padeOrder: 4 });
    expect(m.padeOrder).toBe(4);
    expect(m.closedLoopPoles).toHaveLength(5);
  });
});
