import { describe, expect, it } from 'vitest';
import { InputError } from './errors.ts';
import { dampingFromOvershoot, overshootFromDamping, responseMetrics } from './metrics.ts';

const grid = (tEnd: number, dt: number) => Array.from({ length: Math.round(tEnd / dt) + 1 }, (_, i) => i * dt);

describe('responseMetrics', () => {
  it('first-order lag 1 − e^(−t/τ): tr = τ ln 9, ts(2 %) = τ ln 50, IAE = τ, ISE = τ/2 (analytic)', () => {
    const tau = 0.8;
    const t = grid(20, 1e-3);
    const y = t.map((ti) => 1 - Math.exp(-ti / tau));
    const m = responseMetrics(t, y, { reference: 1, finalValue: 1 });
    expect(Math.abs(m.riseTime! - tau * Math.log(9))).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(m.settlingTime! - tau * Math.log(50))).toBeLessThanOrEqual(1e-6);
    expect(m.overshootPct).toBe(0);
    expect(Math.abs(m.iae - tau)).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(m.ise - tau / 2)).toBeLessThanOrEqual(1e-6);
    // Band 5 %: ts = τ ln 20.
    expect(Math.abs(responseMetrics(t, y, { band: 0.05, finalValue: 1 }).settlingTime! - tau * Math.log(20))).toBeLessThanOrEqual(1e-6);
  });

  it('non-minimum phase (1 − s)/(s + 1)²: undershoot 1 − 2e^(−1/2) at t = 0.5 (analytic)', () => {
    // y = 1 − e^(−t) − 2t·e^(−t) by partial fractions; minimum where y' = e^(−t)(2t − 1) = 0.
    const t = grid(15, 1e-3);
    const y = t.map((ti) => 1 - Math.exp(-ti) - 2 * ti * Math.exp(-ti));
    const m = responseMetrics(t, y, { finalValue: 1 });
    expect(Math.abs(m.undershootPct! - 100 * (2 * Math.exp(-0.5) - 1))).toBeLessThanOrEqual(1e-5);
  });

  it('a direct-feedthrough jump: initialValue 0 makes the −1 start of (1 − s)/(1 + s) a 100 % undershoot', () => {
    const t = grid(10, 1e-3);
    const y = t.map((ti) => 1 - 2 * Math.exp(-ti));
    expect(responseMetrics(t, y, { finalValue: 1, initialValue: 0 }).undershootPct).toBeCloseTo(100, 10);
    expect(responseMetrics(t, y, { finalValue: 1 }).undershootPct).toBe(0);
  });

  it('downward steps and offsets give the same figures as the mirrored upward step', () => {
    const t = grid(10, 1e-3);
    const up = t.map((ti) => 1 - Math.exp(-ti) * (Math.cos(2 * ti) + 0.5 * Math.sin(2 * ti)));
    const down = up.map((v) => 5 - 3 * v);
    const a = responseMetrics(t, up, { finalValue: 1 });
    const b = responseMetrics(t, down, { finalValue: 2 });
    expect(b.riseTime!).toBeCloseTo(a.riseTime!, 9);
    expect(b.overshootPct!).toBeCloseTo(a.overshootPct!, 9);
    expect(b.settlingTime!).toBeCloseTo(a.settlingTime!, 9);
    expect(b.peakTime!).toBeCloseTo(a.peakTime!, 9);
  });

  it('figures that do not exist are null; bad traces are InputErrors', () => {
    const t = grid(1, 0.1);
    const flat = t.map(() => 2);
    const m = responseMetrics(t, flat);
    expect(m.riseTime).toBeNull();
    expect(m.settlingTime).toBeNull();
    const ramp = t.map((ti) => ti);
    expect(responseMetrics(t, ramp, { finalValue: 5 }).settlingTime).toBeNull(); // never inside the band
    expect(() => responseMetrics([0, 1], [0])).toThrow(InputError);
    expect(() => responseMetrics([0, 0], [0, 1])).toThrow(InputError);
    expect(() => responseMetrics([0, 1], [0, NaN])).toThrow(InputError);
    expect(() => responseMetrics([0, 1], [0, 1], { band: 0 })).toThrow(InputError);
  });

  it('overshoot helpers refuse impossible arguments and are exact inverses', () => {
    expect(overshootFromDamping(1)).toBe(0);
    expect(overshootFromDamping(0)).toBe(100);
    expect(() => dampingFromOvershoot(0)).toThrow(InputError);
    expect(() => overshootFromDamping(-0.1)).toThrow(InputError);
    for (const z of [0.05, 0.2, 0.45, 0.8, 0.95]) expect(dampingFromOvershoot(overshootFromDamping(z))).toBeCloseTo(z, 12);
  });
});
