import { compileModel, simulate } from '@loopwright/sim';
import { describe, expect, it } from 'vitest';
import { buildDiagram } from '@loopwright/sim/testing';

const at = (res: { time: number[]; traces: Record<string, number[]> }, key: string, t: number) => {
  const i = res.time.findIndex((x) => Math.abs(x - t) < 1e-9);
  expect(i).toBeGreaterThanOrEqual(0);
  return res.traces[key][i];
};

for (const engine of ['exact', 'odex'] as const) {
  describe(`dead time (${engine} engine)`, () => {
    // R41: 2e^(−1.5s)/(5s + 1), unit step: y = 0 for t ≤ θ, y = K(1 − e^(−(t−θ)/τ)) after;
    // standard first-order-plus-dead-time response (derived here)
    const K = 2;
    const tau = 5;
    const theta = 1.5;
    const fopdt = (t: number) => (t <= theta ? 0 : K * (1 - Math.exp(-(t - theta) / tau)));

    it('first-order lag with dead time in one transfer-function expression (R41)', () => {
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1 }],
          ['g', 'transfer-function', { expression: '2*exp(-1.5*s)/(5*s+1)' }],
          ['y', 'probe'],
        ],
        ['r -> g', 'g -> y'],
      );
      const res = simulate(compileModel(d), { until: 30, rtol: 1e-9, atol: 1e-12, outputStep: 0.1, engine });
      expect(res.status).toBe('ok');
      // R41 table values, abs 1e-5
      expect(Math.abs(at(res, 'y', 1.0) - 0)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(at(res, 'y', 1.5) - 0)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(at(res, 'y', 6.5) - 1.26424)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(at(res, 'y', 11.5) - 1.72933)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(at(res, 'y', 16.5) - 1.90043)).toBeLessThanOrEqual(1e-5);
      // exactly 0 before the dead time, the closed form after it at every output point
      res.time.forEach((t, i) => {
        if (t <= theta) expect(res.traces.y[i]).toBe(0);
        else expect(Math.abs(res.traces.y[i] - fopdt(t))).toBeLessThan(1e-8);
      });
    });

    it('separate dead-time block before a first-order lag gives the same response, and the step may start later', () => {
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1, start: 0.7 }],
          ['dt', 'dead-time', { delay: theta }],
          ['g', 'first-order-lag', { k: K, tau }],
          ['y', 'probe'],
        ],
        ['r -> dt', 'dt -> g', 'g -> y'],
      );
      const res = simulate(compileModel(d), { until: 12, rtol: 1e-9, atol: 1e-12, outputStep: 0.05, engine });
      res.time.forEach((t, i) => expect(Math.abs(res.traces.y[i] - fopdt(t - 0.7))).toBeLessThan(1e-8));
    });

    it('zero dead time passes the signal; a dead time longer than the run keeps the output at rest', () => {
      const mk = (delay: number) =>
        buildDiagram(
          [
            ['r', 'source', { shape: 'step', amplitude: 1 }],
            ['dt', 'dead-time', { delay }],
            ['g', 'first-order-lag', { k: K, tau }],
            ['y', 'probe'],
          ],
          ['r -> dt', 'dt -> g', 'g -> y'],
        );
      const zero = simulate(compileModel(mk(0)), { until: 5, rtol: 1e-9, atol: 1e-12, outputStep: 0.1, engine });
      // first-order step response K(1 − e^(−t/τ)) (standard closed form)
      zero.time.forEach((t, i) => expect(Math.abs(zero.traces.y[i] - K * (1 - Math.exp(-t / tau)))).toBeLessThan(1e-8));
      const long = simulate(compileModel(mk(50)), { until: 5, rtol: 1e-9, atol: 1e-12, outputStep: 0.1, engine });
      expect(long.status).toBe('ok');
      expect(long.traces.y.every((v) => v === 0)).toBe(true);
    });

    it('dead time inside a loop: method-of-steps values (R44)', () => {
      // y' = u(t − θ), u = K(r − y), K = 0.5, θ = 1, r = 1; method of steps: Bellman & Cooke (from memory) [R44]
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1 }],
          ['e', 'summing-junction', { signs: '+-' }],
          ['k', 'gain', { k: 0.5 }],
          ['dt', 'dead-time', { delay: 1 }],
          ['p', 'integrator', { k: 1 }],
          ['y', 'probe'],
        ],
        ['r -> e.in1', 'p -> e.in2', 'e -> k', 'k -> dt', 'dt -> p', 'p -> y'],
      );
      const res = simulate(compileModel(d), { until: 6, rtol: 1e-9, atol: 1e-12, outputStep: 0.25, engine });
      expect(res.status).toBe('ok');
      expect(Math.abs(at(res, 'y', 1) - 0)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(at(res, 'y', 2) - 0.5)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(at(res, 'y', 2.5) - 0.71875)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(at(res, 'y', 3) - 0.875)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(at(res, 'y', 4) - 49 / 48)).toBeLessThanOrEqual(1e-5);
      // the piecewise closed forms on [1, 2] and [2, 3], tighter
      res.time.forEach((t, i) => {
        const y = res.traces.y[i];
        if (t <= 1) expect(Math.abs(y)).toBeLessThan(1e-12);
        else if (t <= 2) expect(Math.abs(y - 0.5 * (t - 1))).toBeLessThan(1e-9);
        else if (t <= 3) expect(Math.abs(y - (0.5 + 0.5 * (t - 2) - 0.125 * (t - 2) ** 2))).toBeLessThan(1e-9);
      });
    });
  });
}
