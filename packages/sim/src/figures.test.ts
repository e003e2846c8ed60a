import { describe, expect, it } from 'vitest';
import { compileModel, simulate } from './index.ts';
import { buildDiagram } from './test-support/build-diagram.ts';

const engines = ['exact', 'odex'] as const;

describe('figures are never invented (peaks from samples and located points only)', () => {
  // A heater whose power is limited to 0 … 1.2: a PI on a first-order room, setpoint step at 1 s.
  // The power jumps to the limit at 1 s and stays there: its largest value is the limit itself.
  const heater = buildDiagram(
    [
      ['r', 'source', { shape: 'step', amplitude: 1, start: 1 }],
      ['e', 'summing-junction', { signs: '+-' }],
      ['c', 'pid', { form: 'ideal', kp: 5, ti: 20, td: 0 }],
      ['s', 'saturation', { lower: 0, upper: 1.2 }],
      ['room', 'first-order-lag', { k: 1, tau: 10 }],
      ['power', 'probe'],
      ['temp', 'probe'],
    ],
    ['r -> e.in1', 'room -> e.in2', 'e -> c', 'c -> s', 's -> room', 's -> power', 'room -> temp'],
  );
  for (const engine of engines) {
    it(`${engine}: a saturated output's peak is its limit (no parabola across the jump at the step)`, () => {
      const res = simulate(compileModel(heater), { until: 60, outputStep: 0.1, engine });
      expect(res.status).toBe('ok');
      const m = res.metrics.power!;
      // the saturation's definition: the output never exceeds the upper limit (common practice, no source)
      expect(Math.max(...res.traces.power)).toBeLessThanOrEqual(1.2);
      expect(m.peak!).toBeLessThanOrEqual(1.2);
      expect(m.peak!).toBe(1.2);
      // overshoot against the final power (the room's loss at 1 K: y∞ = 1 for a unit gain)
      expect(m.overshootPct!).toBeCloseTo((100 * (1.2 - m.steadyState)) / m.steadyState, 10);
    });
  }

  // A dead-time loop: e = r − e(t − 1), y = ∫e with r = 0.5 from t = 0: y = t/2 on [0, 1], then
  // e = 0 and y stays at 0.5 until t = 2 (method of steps, derived here). Its largest value is 0.5.
  const deadLoop = buildDiagram(
    [
      ['r', 'source', { shape: 'step', amplitude: 0.5 }],
      ['e', 'summing-junction', { signs: '+-' }],
      ['d', 'dead-time', { delay: 1 }],
      ['i', 'integrator', { k: 1 }],
      ['y', 'probe'],
    ],
    ['r -> e.in1', 'd -> e.in2', 'e -> d', 'e -> i', 'i -> y'],
  );
  for (const engine of engines) {
    it(`${engine}: a dead-time loop whose output tops out at a kink reports that value, not a parabola's vertex`, () => {
      const res = simulate(compileModel(deadLoop), { until: 2, outputStep: 0.25, engine });
      expect(res.status).toBe('ok');
      res.time.forEach((t, i) => expect(Math.abs(res.traces.y[i] - Math.min(t, 1) / 2)).toBeLessThan(1e-9));
      const m = res.metrics.y!;
      expect(m.peak!).toBeLessThanOrEqual(0.5 + 1e-12);
      expect(Math.abs(m.overshootPct!)).toBeLessThan(1e-9);
    });
  }

  it('exact: a smooth peak between grid points is located on the solution (second-order step, coarse grid)', () => {
    // 4/(s² + 2s + 4): peak 1 + e^(−π/√3) at π/√3 (Ogata, Sec. 5-3, from memory) [R20]
    const d = buildDiagram(
      [
        ['r', 'source', { shape: 'step', amplitude: 1 }],
        ['g', 'second-order', { k: 1, wn: 2, zeta: 0.5 }],
        ['y', 'probe'],
      ],
      ['r -> g', 'g -> y'],
    );
    const res = simulate(compileModel(d), { until: 12, outputStep: 0.25, engine: 'exact', metricsOptions: { finalValue: 1 } });
    const m = res.metrics.y!;
    expect(Math.abs(m.peakTime! - Math.PI / Math.sqrt(3))).toBeLessThan(1e-9);
    expect(Math.abs(m.peak! - (1 + Math.exp(-Math.PI / Math.sqrt(3))))).toBeLessThan(1e-12);
  });
});

describe('relative figures are refused with a reason', () => {
  // PI on a lag, reference 0, a unit load step at the plant input: integral action brings the
  // output back to 0, so its final value hardly differs from its initial one.
  const rejection = buildDiagram(
    [
      ['r', 'source', { shape: 'step', amplitude: 0 }],
      ['load', 'source', { shape: 'step', amplitude: 1, start: 0.5 }],
      ['e', 'summing-junction', { signs: '+-' }],
      ['c', 'pid', { form: 'ideal', kp: 2, ti: 1, td: 0 }],
      ['u', 'summing-junction', { signs: '++' }],
      ['p', 'first-order-lag', { k: 1, tau: 1 }],
      ['y', 'probe'],
    ],
    ['r -> e.in1', 'p -> e.in2', 'e -> c', 'c -> u.in1', 'load -> u.in2', 'u -> p', 'p -> y'],
  );
  // disturbance to output: P/(1 + C·P) = s/(s² + 3s + 2) = 1/(s + 1) − 1/(s + 2) per unit step:
  // y = e^(−τ) − e^(−2τ), τ = t − 0.5, largest 1/4 at τ = ln 2 (partial fractions, derived here)
  for (const engine of engines) {
    it(`${engine}: a disturbance response that returns to zero has no overshoot, rise or settling figure`, () => {
      const res = simulate(compileModel(rejection), { until: 40, engine, metricsOptions: { reference: 0 } });
      expect(res.status).toBe('ok');
      const m = res.metrics.y!;
      for (const f of ['overshootPct', 'riseTime', 'settlingTime', 'steadyStateError', 'undershootPct'] as const) {
        expect(m[f], f).toBeNull();
        expect(m.refused[f], f).toMatch(/final value is within 0.1 % of the largest excursion/);
      }
      // the peak is still reported: the largest excursion (located exactly by the exact engine)
      expect(Math.abs(m.peak! - 0.25)).toBeLessThan(engine === 'exact' ? 1e-12 : 1e-5);
      expect(Math.abs(m.peakTime! - (0.5 + Math.LN2))).toBeLessThan(engine === 'exact' ? 1e-9 : 1e-2);
    });
  }

  it('a diverged run has no settling figure, and none relative to a final value it never reached', () => {
    const d = buildDiagram(
      [
        ['r', 'source', { shape: 'step', amplitude: 1 }],
        ['g', 'transfer-function', { expression: '1/(s - 1)' }],
        ['y', 'probe'],
      ],
      ['r -> g', 'g -> y'],
    );
    for (const engine of engines) {
      const res = simulate(compileModel(d), { until: 100, divergenceBound: 1e6, engine });
      expect(res.status).toBe('diverged');
      const m = res.metrics.y!;
      expect(m.settlingTime).toBeNull();
      expect(m.overshootPct).toBeNull();
      expect(m.refused.settlingTime).toMatch(/stopped early \(diverged/);
    }
  });
});

describe('no silent cap on source edges', () => {
  // a 1 kHz pulse train (amplitude 1, width 0.5 ms) into an integrator
  const d = buildDiagram(
    [
      ['r', 'source', { shape: 'pulse', amplitude: 1, width: 5e-4, period: 1e-3 }],
      ['i', 'integrator', { k: 1 }],
      ['y', 'probe'],
    ],
    ['r -> i', 'i -> y'],
  );

  it('a 1 kHz pulse train runs for 100 s to the end, every pulse counted', () => {
    // ∫ of a pulse train of amplitude 1, width 0.5 ms, period 1 ms over 100 s: 100·0.5 = 50 (exact)
    const model = compileModel(d);
    // default budgets: the end, or a stop that says so — never "ok" short of the end
    const dflt = simulate(model, { until: 100 });
    if (dflt.status === 'ok') expect(dflt.timeReached).toBe(100);
    else expect(dflt.message).toMatch(/ran out at t = /);
    // with room for its 200 000 edges it completes, and every pulse is counted
    const res = simulate(model, { until: 100, outputStep: 0.5, maxSteps: 1e6, maxWallMs: 60000 });
    expect(res.engine).toBe('exact');
    expect(res.status, res.message).toBe('ok');
    expect(res.timeReached).toBe(100);
    expect(Math.abs(res.traces.y[res.traces.y.length - 1] - 50)).toBeLessThan(1e-9);
    // at 25 s (where a fixed cap used to stop adding edges) the count is right too
    const i25 = res.time.indexOf(25);
    expect(Math.abs(res.traces.y[i25] - 12.5)).toBeLessThan(1e-9);
  });

  it('a run that cannot finish within its budget says so (status not ok, the time reached in the message)', () => {
    for (const engine of engines) {
      const res = simulate(compileModel(d), { until: 100, outputStep: 0.5, maxSteps: 20000, engine });
      expect(res.status).toBe('budget');
      expect(res.message).toMatch(/budget .* ran out at t = /);
      expect(res.timeReached).toBeLessThan(100);
    }
  });
});
