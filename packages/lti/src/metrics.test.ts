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

  it('the peak is refined by a parabola only where no break lies between its samples', () => {
    // a ramp up to 1.2 at t = 1, then held: the largest value is 1.2 (a saturated output);
    // the parabola through (0.9, 1.08), (1, 1.2), (1.1, 1.2) would put its vertex above the limit
    const t = grid(3, 0.1);
    const y = t.map((ti) => Math.min(1.2 * ti, 1.2));
    const free = responseMetrics(t, y, { finalValue: 1 });
    expect(free.peak!).toBeGreaterThan(1.2); // what an unguarded refinement invents
    const guarded = responseMetrics(t, y, { finalValue: 1, breaks: [1] });
    expect(guarded.peak).toBe(1.2);
    expect(guarded.peakTime).toBeCloseTo(1, 12);
    expect(guarded.overshootPct!).toBeCloseTo(20, 10);
    // a break elsewhere does not stop a smooth peak's refinement: y = sin t peaks at π/2 (exact)
    const wave = grid(3, 0.1).map(Math.sin);
    const smooth = responseMetrics(grid(3, 0.1), wave, { finalValue: 0.5, initialValue: 0, breaks: [2.5] });
    expect(Math.abs(smooth.peakTime! - Math.PI / 2)).toBeLessThan(1e-3);
  });

  it('exact points between samples (located turning points) replace the parabola', () => {
    const t = grid(3, 0.1);
    const y = t.map(Math.sin);
    const m = responseMetrics(t, y, { finalValue: 0.5, initialValue: 0, extrema: [{ time: Math.PI / 2, value: 1 }] });
    expect(m.peak).toBe(1);
    expect(m.peakTime).toBe(Math.PI / 2);
    // an empty list means "located: none beyond the samples": the peak is the largest sample
    const none = responseMetrics(t, y, { finalValue: 0.5, initialValue: 0, extrema: [] });
    expect(none.peak).toBe(Math.max(...y));
    expect(() => responseMetrics(t, y, { extrema: [{ time: NaN, value: 1 }] })).toThrow(InputError);
  });

  it('figures relative to a change near zero are refused with a reason; the peak is the largest excursion', () => {
    // a bump that returns to rest: y = t·e^(1 − t), largest 1 at t = 1, back to 4.5e-3 at t = 8
    const t = grid(30, 0.01);
    const y = t.map((ti) => ti * Math.exp(1 - ti));
    const m = responseMetrics(t, y, { reference: 0 });
    for (const f of ['riseTime', 'overshootPct', 'settlingTime', 'steadyStateError', 'undershootPct'] as const) {
      expect(m[f], f).toBeNull();
      expect(m.refused[f], f).toMatch(/within 0.1 % of the largest excursion/);
    }
    expect(Math.abs(m.peak! - 1)).toBeLessThan(1e-6);
    expect(Math.abs(m.peakTime! - 1)).toBeLessThan(1e-3);
    // a clear change keeps every figure
    const step = responseMetrics(
      t,
      t.map((ti) => 1 - Math.exp(-ti)),
    );
    expect(step.refused).toEqual({});
    expect(step.settlingTime).not.toBeNull();
  });

  it('an incomplete trace has no settling figure, and none relative to an unknown final value', () => {
    const t = grid(5, 0.01);
    const y = t.map((ti) => 1 - Math.exp(-ti));
    const m = responseMetrics(t, y, { incomplete: 'budget: stopped at t = 5 s' });
    expect(m.settlingTime).toBeNull();
    expect(m.riseTime).toBeNull();
    expect(m.refused.settlingTime).toMatch(/stopped early \(budget/);
    // with the final value known, only settling stays refused
    const known = responseMetrics(t, y, { incomplete: 'cancelled', finalValue: 1 });
    expect(Math.abs(known.riseTime! - Math.log(9))).toBeLessThan(1e-4); // 10–90 % of 1 − e^(−t): ln 9 (analytic)
    expect(known.settlingTime).toBeNull();
    expect(Object.keys(known.refused)).toEqual(['settlingTime']);
  });

  it('overshoot helpers refuse impossible arguments and are exact inverses', () => {
    expect(overshootFromDamping(1)).toBe(0);
    expect(overshootFromDamping(0)).toBe(100);
    expect(() => dampingFromOvershoot(0)).toThrow(InputError);
    expect(() => overshootFromDamping(-0.1)).toThrow(InputError);
    for (const z of [0.05, 0.2, 0.45, 0.8, 0.95]) expect(dampingFromOvershoot(overshootFromDamping(z))).toBeCloseTo(z, 12);
  });
});
