import { describe, expect, it } from 'vitest';
import { errorConstants, exactStepResponse, padeDelay, poly, radd, rational, rdiv, rconst, steadyStateError } from '@loopwright/lti';

describe('exact step responses against analytic solutions', () => {
  it('R20: 4/(s² + 2s + 4), y = 1 − e^(−t)(cos √3t + sin √3t/√3)', () => {
    const r = rational([4], [4, 2, 1]);
    const analytic = (t: number) => 1 - Math.exp(-t) * (Math.cos(Math.sqrt(3) * t) + Math.sin(Math.sqrt(3) * t) / Math.sqrt(3));
    const t = [0.5, 1, 2, 3];
    const y = exactStepResponse(r, t);
    // derived in the reference table; formula Ogata, Sec. 5-3 (from memory) [R20]
    const table = [0.3403, 0.84943, 1.15312, 1.00229];
    y.forEach((v, i) => {
      expect(Math.abs(v - table[i])).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(v - analytic(t[i]))).toBeLessThanOrEqual(1e-12);
    });
    // First peak at tp = π/√3 with y = 1 + e^(−π/√3).
    const tp = Math.PI / Math.sqrt(3);
    expect(Math.abs(tp - 1.8138)).toBeLessThanOrEqual(1e-4);
    const [yp, before, after] = exactStepResponse(r, [tp, tp - 1e-4, tp + 1e-4]);
    expect(Math.abs(yp - (1 + Math.exp(-Math.PI / Math.sqrt(3))))).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(yp - 1.16303)).toBeLessThanOrEqual(1e-5);
    expect(yp).toBeGreaterThan(before);
    expect(yp).toBeGreaterThan(after);
  });

  it('R33: Padé (1,1) with T = 2 is (1 − s)/(1 + s); step 1 − 2e^(−t): undershoot to −1, zero at ln 2', () => {
    const p = padeDelay(2, 1);
    const [y0, y1, yz, yInf] = exactStepResponse(p, [0, 1, Math.LN2, 60]);
    // derived in the reference table [R33]
    expect(Math.abs(y0 - -1)).toBeLessThanOrEqual(1e-5);
    expect(Math.abs(y1 - 0.26424)).toBeLessThanOrEqual(1e-5);
    expect(Math.abs(y1 - (1 - 2 * Math.exp(-1)))).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(yz)).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(Math.LN2 - 0.69315)).toBeLessThanOrEqual(1e-5);
    expect(Math.abs(yInf - 1)).toBeLessThanOrEqual(1e-5);
  });

  it('R41: 2e^(−1.5s)/(5s + 1): y = 0 until θ, then 2(1 − e^(−(t−θ)/5))', () => {
    const r = rational([2], [1, 5]);
    const t = [1, 1.5, 6.5, 11.5, 16.5, 200];
    const y = exactStepResponse(r, t, 1.5);
    // derived in the reference table (first-order-plus-dead-time response) [R41]
    const table = [0, 0, 1.26424, 1.72933, 1.90043, 2];
    y.forEach((v, i) => expect(Math.abs(v - table[i])).toBeLessThanOrEqual(1e-5));
    expect(Math.abs(y[2] - 2 * (1 - Math.exp(-1)))).toBeLessThanOrEqual(1e-12);
  });
});

describe('error constants and the final-value theorem', () => {
  const G38 = rational(poly.scale([2, 1], 120), poly.mul([3, 1], [4, 1]));
  const G39 = rational(poly.scale(poly.mul([2, 1], [6, 1]), 100), poly.mul(poly.mul([0, 1], [3, 1]), [4, 1]));
  const G40 = rational(poly.scale([1, 1], 10), poly.mul([0, 0, 1], [5, 1]));

  it('R38: 120(s+2)/((s+3)(s+4)): Kp = 20, e∞ = 5/21 for 5u(t), ∞ for ramp and parabola', () => {
    // Nise, Sec. 7.3, example with this G (from memory) [R38]
    const k = errorConstants(G38);
    expect(k.type).toBe(0);
    expect(Math.abs(k.kp - 20)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(steadyStateError(G38, 0, 5) - 0.2381)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(steadyStateError(G38, 0, 5) - 5 / 21)).toBeLessThanOrEqual(1e-12);
    expect(steadyStateError(G38, 1, 5)).toBe(Infinity);
    expect(steadyStateError(G38, 2, 10)).toBe(Infinity); // 5t² = 10·t²/2
    // Second method: the exact closed-loop step response settles to 1 − e∞ (per unit step).
    const T = rdiv(G38, radd(rconst(1), G38));
    const [yEnd] = exactStepResponse(T, [50]);
    expect(Math.abs(5 * (1 - yEnd) - 5 / 21)).toBeLessThanOrEqual(1e-9);
  });

  it('R39: 100(s+2)(s+6)/(s(s+3)(s+4)): Kv = 100, e∞ = 0 / 0.05 / ∞', () => {
    // Nise, Sec. 7.3, example with this G (from memory) [R39]
    const k = errorConstants(G39);
    expect(k.type).toBe(1);
    expect(k.kp).toBe(Infinity);
    expect(Math.abs(k.kv - 100)).toBeLessThanOrEqual(1e-4);
    expect(steadyStateError(G39, 0, 5)).toBe(0);
    expect(Math.abs(steadyStateError(G39, 1, 5) - 0.05)).toBeLessThanOrEqual(1e-4);
    expect(steadyStateError(G39, 2, 10)).toBe(Infinity);
  });

  it('R40: 10(s+1)/(s²(s+5)): Ka = 2, e∞ = 0 / 0 / 0.5 for r = t²/2', () => {
    // final-value theorem and error constants: Nise, Sec. 7.3; Ogata, Sec. 5-8 (from memory) [R40]
    const k = errorConstants(G40);
    expect(k.type).toBe(2);
    expect(Math.abs(k.ka - 2)).toBeLessThanOrEqual(1e-4);
    // Closed loop s³ + 5s² + 10s + 10 (stable), rebuilt from G, not typed.
    expect(poly.add(G40.num, G40.den)).toEqual(poly.fromDescending([1, 5, 10, 10]));
    expect(steadyStateError(G40, 0)).toBe(0);
    expect(steadyStateError(G40, 1)).toBe(0);
    expect(Math.abs(steadyStateError(G40, 2) - 0.5)).toBeLessThanOrEqual(1e-4);
  });
});
