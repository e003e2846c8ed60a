import { describe, expect, it } from 'vitest';
import {
  dampingFromOvershoot,
  exactStepResponse,
  overshootFromDamping,
  rational,
  responseMetrics,
  secondOrderFigures,
} from '@loopwright/lti';

/** Analytic unit-step response of ωn²/(s² + 2ζωn s + ωn²), 0 < ζ < 1 (Ogata, Sec. 5-3, from memory). */
function secondOrderStep(zeta: number, wn: number, t: number): number {
  const wd = wn * Math.sqrt(1 - zeta * zeta);
  const sg = zeta * wn;
  return 1 - Math.exp(-sg * t) * (Math.cos(wd * t) + (sg / wd) * Math.sin(wd * t));
}
const grid = (tEnd: number, dt: number) => Array.from({ length: Math.round(tEnd / dt) + 1 }, (_, i) => i * dt);

describe('response metrics against published formulas', () => {
  it('R17: %OS = 100·exp(−ζπ/√(1 − ζ²)) and its inverse', () => {
    // Ogata, Sec. 5-3; Nise, Sec. 4.6, Eqs. (4.38)–(4.39) (from memory) [R17]
    const os: [number, number][] = [
      [0.3, 37.23],
      [0.5, 16.3],
      [0.7, 4.6],
      [0.7071, 4.32],
    ];
    for (const [z, pct] of os) expect(Math.abs(overshootFromDamping(z) - pct)).toBeLessThanOrEqual(0.01);
    const zs: [number, number][] = [
      [5, 0.69011],
      [10, 0.59116],
      [20, 0.45595],
    ];
    for (const [pct, z] of zs) {
      expect(Math.abs(dampingFromOvershoot(pct) - z)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(overshootFromDamping(dampingFromOvershoot(pct)) - pct)).toBeLessThanOrEqual(1e-10);
    }
  });

  it('R18: ζ = 0.6, ωn = 5: tr(0–100 %) = 0.5536, tp = 0.7854, Mp = 9.48 %, ts ≈ 1.3333 (2 %), 1.0 (5 %)', () => {
    // Ogata, Sec. 5-3, Example 5-1 (from memory) [R18]
    const f = secondOrderFigures(0.6, 5);
    expect(Math.abs(f.riseTime0to100 - 0.5536)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(f.peakTime - 0.7854)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(f.overshootPct - 9.48)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(f.settlingEstimate2 - 4 / 3)).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(f.settlingEstimate5 - 1)).toBeLessThanOrEqual(1e-12);
    // Book values to their printed digits: 0.55, 0.785, 9.5 %, 1.33.
    expect(Math.abs(f.riseTime0to100 - 0.55)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(f.peakTime - 0.785)).toBeLessThanOrEqual(0.001);
    expect(Math.abs(f.overshootPct - 9.5)).toBeLessThanOrEqual(0.1);
    // The same figures measured on the sampled analytic response.
    const t = grid(6, 1e-3);
    const y = t.map((ti) => secondOrderStep(0.6, 5, ti));
    const m = responseMetrics(t, y, { finalValue: 1, riseLevels: [0, 1] });
    expect(Math.abs(m.riseTime! - 0.5536)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(m.peakTime! - 0.7854)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(m.overshootPct! - 9.48)).toBeLessThanOrEqual(0.01);
  });

  it('R19: 100/(s² + 15s + 100): ζ = 0.75, ωn = 10, Tp = 0.4750, %OS = 2.838, Ts ≈ 0.5333, Tr = 0.2288', () => {
    // Nise, Sec. 4.6, Example 4.5 (from memory) [R19]
    const wn = Math.sqrt(100);
    const zeta = 15 / (2 * wn);
    expect(wn).toBe(10);
    expect(zeta).toBe(0.75);
    const f = secondOrderFigures(zeta, wn);
    expect(Math.abs(f.peakTime - 0.475)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(f.overshootPct - 2.838)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(f.settlingEstimate2 - 0.5333)).toBeLessThanOrEqual(1e-4);
    const t = grid(3, 5e-4);
    const y = exactStepResponse(rational([100], [100, 15, 1]), t);
    const m = responseMetrics(t, y, { finalValue: 1 });
    expect(Math.abs(m.riseTime! - 0.2288)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(m.riseTime! - 0.23)).toBeLessThanOrEqual(0.01); // the book's reading off its curve
    expect(Math.abs(m.peakTime! - 0.475)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(m.overshootPct! - 2.838)).toBeLessThanOrEqual(1e-3);
  });

  it('R20: 4/(s² + 2s + 4): tp = 1.8138, y(tp) = 1.16303, tr = 0.8188 (ωn·tr = 1.638), exact ts = 4.0382 vs 4.0', () => {
    // derived in the reference table; normalised rise time 1.638 at ζ = 0.5 as tabulated in Nise, Sec. 4.6 (from memory) [R20]
    const t = grid(12, 1e-3);
    const exact = exactStepResponse(rational([4], [4, 2, 1]), t);
    const analytic = t.map((ti) => secondOrderStep(0.5, 2, ti));
    exact.forEach((v, i) => expect(Math.abs(v - analytic[i])).toBeLessThanOrEqual(1e-10));
    const m = responseMetrics(t, exact, { finalValue: 1, reference: 1 });
    expect(Math.abs(m.peakTime! - 1.8138)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(m.peakTime! - Math.PI / Math.sqrt(3))).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(m.peak! - 1.16303)).toBeLessThanOrEqual(1e-5);
    expect(Math.abs(m.riseTime! - 0.8188)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(2 * m.riseTime! - 1.638)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(m.settlingTime! - 4.0382)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(secondOrderFigures(0.5, 2).settlingEstimate2 - 4)).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(m.overshootPct! - 100 * Math.exp(-Math.PI / Math.sqrt(3)))).toBeLessThanOrEqual(1e-4);
    expect(m.steadyStateError).toBe(0);
    expect(m.undershootPct).toBe(0);
  });
});
