import { compileModel, simulate, type SimResult } from '@loopwright/sim';
import { describe, expect, it } from 'vitest';
import { buildDiagram } from '@loopwright/sim/testing';

const at = (res: SimResult, key: string, t: number) => {
  const i = res.time.findIndex((x) => Math.abs(x - t) < 1e-9);
  expect(i).toBeGreaterThanOrEqual(0);
  return res.traces[key][i];
};
const peakOf = (res: SimResult, key: string) => {
  let peak = -Infinity;
  let tp = 0;
  res.traces[key].forEach((v, i) => {
    if (v > peak) {
      peak = v;
      tp = res.time[i];
    }
  });
  return { peak, tp };
};

for (const engine of ['exact', 'odex'] as const) {
  describe(`integrator driven through a saturation ±1 (R42, derived here; ${engine} engine)`, () => {
    it('(i) constant input 5: y = t, slope = the limit', () => {
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 5 }],
          ['s', 'saturation', { lower: -1, upper: 1 }],
          ['i', 'integrator', { k: 1 }],
          ['y', 'probe'],
        ],
        ['r -> s', 's -> i', 'i -> y'],
      );
      const res = simulate(compileModel(d), { until: 4, rtol: 1e-9, atol: 1e-12, outputStep: 0.1, wires: ['w2'], engine });
      expect(Math.abs(at(res, 'y', 3) - 3)).toBeLessThanOrEqual(1e-5);
      for (let i = 1; i < res.time.length; i++) {
        const slope = (res.traces.y[i] - res.traces.y[i - 1]) / (res.time[i] - res.time[i - 1]);
        expect(Math.abs(slope - 1)).toBeLessThan(1e-9);
      }
      expect(res.traces['wire:w2'].every((v) => v === 1)).toBe(true);
      expect(res.actuators.s.limitHits).toBe(1);
      expect(res.actuators.s.timeInSaturation).toBeCloseTo(4, 12);
    });

    it('(ii) input 2·sin t: leaves the linear range at π/6, returns at 5π/6', () => {
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'sinusoid', amplitude: 2, omega: 1 }],
          ['s', 'saturation', { lower: -1, upper: 1 }],
          ['i', 'integrator', { k: 1 }],
          ['y', 'probe'],
        ],
        ['r -> s', 's -> i', 'i -> y'],
      );
      const res = simulate(compileModel(d), { until: Math.PI, rtol: 1e-10, atol: 1e-12, outputStep: 0.01, engine });
      const enter = res.events.find((e) => e.kind === 'limit-upper')!;
      const leave = res.events.find((e) => e.kind === 'limit-leave')!;
      // 2 sin t = 1 at t = π/6 and 5π/6 (exact)
      expect(Math.abs(enter.time - Math.PI / 6)).toBeLessThan(1e-9);
      expect(Math.abs(leave.time - (5 * Math.PI) / 6)).toBeLessThan(1e-9);
      // R42 values: y(π/6) = 2 − √3, y(5π/6) = 2 − √3 + 2π/3, y(π) = 4 − 2√3 + 2π/3 (abs 1e-5; closed forms tighter)
      const yAt = (t: number) => res.traces.y[res.time.findIndex((x) => Math.abs(x - t) < 1e-9)];
      expect(Math.abs(yAt(enter.time) - (2 - Math.sqrt(3)))).toBeLessThan(1e-8);
      expect(Math.abs(yAt(leave.time) - (2 - Math.sqrt(3) + (2 * Math.PI) / 3))).toBeLessThan(1e-8);
      expect(Math.abs(res.traces.y[res.traces.y.length - 1] - 2.63029)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(res.traces.y[res.traces.y.length - 1] - (4 - 2 * Math.sqrt(3) + (2 * Math.PI) / 3))).toBeLessThan(1e-8);
      expect(Math.abs(res.actuators.s.timeInSaturation - (2 * Math.PI) / 3)).toBeLessThan(1e-9);
    });
  });

  describe(`PI loop around an integrating plant with a saturated actuator (R43; ${engine} engine)`, () => {
    // Plant 1/s; PI Kc(1 + 1/(Ti s)), Kc = 2, Ti = 2; actuator limit ±0.5; r = 1. Derived here
    // (piecewise analytic); integrator windup: Åström & Hägglund, Advanced PID Control, ch. 3 (from memory).
    const t1 = Math.sqrt(6);
    const peakExact = 1 + ((Math.sqrt(6) - 1) / 2) * Math.exp(-1 / (Math.sqrt(6) - 1));
    const loop = (controller: Record<string, string | number>, separateLimit: boolean) =>
      buildDiagram(
        separateLimit
          ? [
              ['r', 'source', { shape: 'step', amplitude: 1 }],
              ['e', 'summing-junction', { signs: '+-' }],
              ['c', 'pid', controller],
              ['s', 'saturation', { lower: -0.5, upper: 0.5 }],
              ['p', 'integrator', { k: 1 }],
              ['y', 'probe'],
            ]
          : [
              ['r', 'source', { shape: 'step', amplitude: 1 }],
              ['e', 'summing-junction', { signs: '+-' }],
              ['c', 'pid', controller],
              ['p', 'integrator', { k: 1 }],
              ['y', 'probe'],
              ['u', 'probe'],
            ],
        separateLimit
          ? ['r -> e.in1', 'p -> e.in2', 'e -> c', 'c -> s', 's -> p', 'p -> y']
          : ['r -> e.in1', 'p -> e.in2', 'e -> c', 'c -> p', 'p -> y', 'c -> u'],
      );
    const opts = { until: 12, rtol: 1e-10, atol: 1e-12, outputStep: 1e-4, engine };
    const pi = { form: 'ideal', kp: 2, ti: 2, td: 0 };

    it('anti-windup off, limits in the PID block: t1 = √6, peak 1.36355 at 3.1394 s, no re-saturation', () => {
      const res = simulate(compileModel(loop({ ...pi, umin: -0.5, umax: 0.5, antiWindup: 'off' }, false)), opts);
      expect(res.status).toBe('ok');
      const leave = res.events.find((e) => e.kind === 'limit-leave')!;
      expect(Math.abs(leave.time - 2.4495)).toBeLessThanOrEqual(1e-4);
      expect(Math.abs(leave.time - t1)).toBeLessThan(1e-8);
      const { peak, tp } = peakOf(res, 'y');
      expect(Math.abs(peak - 1.36355)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(peak - peakExact)).toBeLessThan(1e-8);
      expect(Math.abs(tp - 3.1394)).toBeLessThanOrEqual(1e-4);
      expect(Math.abs(100 * (peak - 1) - 36.355)).toBeLessThanOrEqual(1e-3);
      // min u after t1 = −0.1337 (inside the limits: no re-saturation)
      const uAfter = res.traces.u.filter((_, i) => res.time[i] > t1);
      expect(Math.abs(Math.min(...uAfter) - -0.1337)).toBeLessThanOrEqual(1e-4);
      expect(res.events.filter((e) => e.kind.startsWith('limit-')).length).toBe(2);
      expect(res.actuators.c.limitHits).toBe(1);
      expect(Math.abs(res.actuators.c.timeInSaturation - t1)).toBeLessThan(1e-8);
      expect(res.actuators.c.peakEffort).toBe(0.5);
    });

    it('the same with a separate saturation block after an unlimited PI', () => {
      const res = simulate(compileModel(loop(pi, true)), opts);
      const { peak, tp } = peakOf(res, 'y');
      expect(Math.abs(peak - peakExact)).toBeLessThan(1e-8);
      expect(Math.abs(tp - 3.1394)).toBeLessThanOrEqual(1e-4);
    });

    it('linear run (limits off) gives the unlimited loop (2s + 1)/(s + 1)²: peak 1 + e^−2 at t = 2', () => {
      const res = simulate(compileModel(loop({ ...pi, umin: -0.5, umax: 0.5, antiWindup: 'off' }, false)), { ...opts, linear: true });
      const { peak, tp } = peakOf(res, 'y');
      expect(Math.abs(peak - (1 + Math.exp(-2)))).toBeLessThan(1e-8);
      expect(Math.abs(tp - 2)).toBeLessThanOrEqual(1e-4);
      expect(res.events.length).toBe(0);
    });

    it('anti-windup: back-calculation and conditional integration both overshoot clearly less than off', () => {
      const model = (aw: string) => compileModel(loop({ ...pi, umin: -0.5, umax: 0.5, antiWindup: aw }, false));
      const off = peakOf(simulate(model('off'), opts), 'y').peak - 1;
      const back = peakOf(simulate(model('back-calculation'), opts), 'y').peak - 1;
      const cond = simulate(model('conditional'), opts);
      const condOs = peakOf(cond, 'y').peak - 1;
      // ranking: windup (off) > back-calculation (Tt = Ti = 2 s) > clamping for this loop; both under half the windup overshoot
      expect(back).toBeLessThan(0.5 * off);
      expect(condOs).toBeLessThan(0.5 * off);
      expect(condOs).toBeLessThan(back);
      expect(back).toBeGreaterThan(0);
      // conditional integration: the integral is held at 0 while saturated, so u = 2(1 − t/2) leaves the limit at t = 1.5 exactly
      const leave = cond.events.find((e) => e.kind === 'limit-leave')!;
      expect(Math.abs(leave.time - 1.5)).toBeLessThan(1e-8);
      expect(cond.events.some((e) => e.kind === 'integration-hold')).toBe(true);
    });
  });
}
