import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fopdt, ipdt, sopdt } from './process-model.ts';
import { modelResponse, modelStepResponse, unitResponse } from './response.ts';

describe('model responses to a sampled input', () => {
  const time = Array.from({ length: 41 }, (_, i) => 0.5 * i);
  const steps = time.map((t) => (t >= 2 ? 1 : 0) + (t >= 9 ? -0.5 : 0));

  it('held input: superposition of step responses (exact, a property over random models)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.05, max: 20, noNaN: true }),
        fc.double({ min: 0.05, max: 20, noNaN: true }),
        fc.double({ min: 0, max: 6, noNaN: true }),
        (a, b, theta) => {
          const m = sopdt(1.3, a, b, theta);
          const y = modelResponse(m, { time, value: steps, between: 'hold' });
          const want = time.map((t) => modelStepResponse(m, [t - 2])[0] - 0.5 * modelStepResponse(m, [t - 9])[0]);
          y.forEach((v, i) => expect(Math.abs(v - want[i])).toBeLessThanOrEqual(1e-12));
        },
      ),
      { numRuns: 60 },
    );
  });

  it('equal lags need no special case: τ1 = τ2 gives 1 − e^(−t/τ)(1 + t/τ)', () => {
    const t = [0.3, 1, 4, 11];
    const y = modelStepResponse(sopdt(1, 2, 2, 0), t);
    t.forEach((x, i) => expect(y[i]).toBeCloseTo(1 - Math.exp(-x / 2) * (1 + x / 2), 14));
    const near = modelStepResponse(sopdt(1, 2, 2 * (1 + 1e-9), 0), t);
    near.forEach((v, i) => expect(Math.abs(v - y[i])).toBeLessThan(1e-8));
  });

  it('linear input: an integrator gives the exact trapezoid integral; after the last sample the input is held', () => {
    const u = time.map((t) => Math.sin(t));
    const y = modelResponse(ipdt(1, 0), { time, value: u, between: 'linear' }, [...time, 25]);
    let s = 0;
    for (let i = 1; i < time.length; i++) {
      s += 0.25 * (u[i - 1] + u[i]);
      expect(Math.abs(y[i] - (u[0] * 0 + s))).toBeLessThanOrEqual(1e-12);
    }
    expect(y[0]).toBe(0);
    expect(Math.abs(y[time.length] - (s + (25 - 20) * u[u.length - 1]))).toBeLessThanOrEqual(1e-12);
  });

  it('is continuous in the dead time (never rounded to whole samples)', () => {
    const input = { time, value: steps, between: 'linear' as const };
    const at = (theta: number) => unitResponse('fopdt', [3], theta, input);
    for (const theta of [0.5, 0.73, 1]) {
      const a = at(theta);
      const b = at(theta + 1e-9);
      a.forEach((v, i) => expect(Math.abs(v - b[i])).toBeLessThan(1e-8));
    }
    // Shifting the dead time by a whole sample shifts the response by one sample.
    const a = at(0.5);
    const b = at(1);
    for (let i = 1; i < time.length; i++) expect(b[i]).toBeCloseTo(a[i - 1], 12);
  });

  it('FOPDT response equals the gain times the unit response', () => {
    const m = fopdt(-2.5, 4, 1.2);
    const y = modelResponse(m, { time, value: steps, between: 'hold' });
    const r = unitResponse('fopdt', [4], 1.2, { time, value: steps, between: 'hold' });
    y.forEach((v, i) => expect(v).toBeCloseTo(-2.5 * r[i], 14));
  });
});
