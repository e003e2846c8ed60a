import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compileModel, simulate } from './index.ts';
import { buildDiagram } from './test-support/build-diagram.ts';

/** Secant slopes between samples at least `gap` apart (event times can sit 1e-11 s apart, where a secant is round-off). */
const slopes = (t: number[], y: number[], gap = 1e-4) => {
  const out: number[] = [];
  let a = 0;
  for (let i = 1; i < t.length; i++) {
    if (t[i] - t[a] < gap) continue;
    out.push((y[i] - y[a]) / (t[i] - t[a]));
    a = i;
  }
  return out;
};

for (const engine of ['exact', 'odex'] as const) {
  describe(`rate limit (${engine} engine)`, () => {
    it('output slope never exceeds the rising and falling limits (property over inputs and limits)', () => {
      fc.assert(
        fc.property(
          fc.constantFrom('step', 'sinusoid', 'pulse', 'ramp'),
          fc.double({ min: 0.2, max: 3, noNaN: true }),
          fc.double({ min: 0.2, max: 3, noNaN: true }),
          fc.double({ min: 0.3, max: 3, noNaN: true }),
          (shape, rising, falling, amplitude) => {
            const d = buildDiagram(
              [
                ['r', 'source', { shape, amplitude, omega: 2, width: 1.5, period: 4 }],
                ['rl', 'rate-limit', { rising, falling }],
                ['y', 'probe'],
              ],
              ['r -> rl', 'rl -> y'],
            );
            const res = simulate(compileModel(d), { until: 8, outputStep: 0.01, rtol: 1e-10, atol: 1e-12, engine });
            expect(res.status).toBe('ok');
            // definition of a rate limiter: |dy/dt| bounded by the limits (common practice, no source)
            for (const s of slopes(res.time, res.traces.y)) {
              expect(s).toBeLessThanOrEqual(rising * (1 + 1e-6) + 1e-9);
              expect(s).toBeGreaterThanOrEqual(-falling * (1 + 1e-6) - 1e-9);
            }
          },
        ),
        { numRuns: 20 },
      );
    });

    it('a step is followed at the rising rate and then tracked: y = min(rate·t, 1) exactly', () => {
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1 }],
          ['rl', 'rate-limit', { rising: 0.4, falling: 1 }],
          ['y', 'probe'],
        ],
        ['r -> rl', 'rl -> y'],
      );
      const res = simulate(compileModel(d), { until: 5, outputStep: 0.05, engine });
      res.time.forEach((t, i) => expect(Math.abs(res.traces.y[i] - Math.min(0.4 * t, 1))).toBeLessThan(1e-9));
      const leave = res.events.find((e) => e.kind === 'rate-leave')!;
      expect(Math.abs(leave.time - 2.5)).toBeLessThan(1e-9);
      expect(Math.abs(res.actuators.rl.timeInSaturation - 2.5)).toBeLessThan(1e-9);
    });

    it('linear run passes the signal', () => {
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1 }],
          ['rl', 'rate-limit', { rising: 0.4, falling: 1 }],
          ['y', 'probe'],
        ],
        ['r -> rl', 'rl -> y'],
      );
      const res = simulate(compileModel(d), { until: 2, outputStep: 0.5, linear: true, engine });
      expect(res.traces.y).toEqual([1, 1, 1, 1, 1]);
    });
  });

  describe(`dead zone (${engine} engine)`, () => {
    it('output is zero inside the band and input − edge outside; band edges are exact events', () => {
      const lower = -0.5;
      const upper = 0.8;
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'sinusoid', amplitude: 2, omega: 1 }],
          ['dz', 'dead-zone', { lower, upper }],
          ['y', 'probe'],
          ['u', 'probe'],
        ],
        ['r -> dz', 'dz -> y', 'r -> u'],
      );
      const res = simulate(compileModel(d), { until: 7, outputStep: 0.01, engine });
      res.time.forEach((t, i) => {
        const u = 2 * Math.sin(t);
        const want = u > upper ? u - upper : u < lower ? u - lower : 0;
        if (u >= lower && u <= upper) expect(res.traces.y[i]).toBe(0);
        expect(Math.abs(res.traces.y[i] - want)).toBeLessThan(1e-12);
      });
      // 2 sin t = 0.8 first at t = asin(0.4)
      const first = res.events.find((e) => e.kind === 'dead-zone-leave')!;
      expect(Math.abs(first.time - Math.asin(0.4))).toBeLessThan(1e-9);
      expect(res.actuators.dz).toBeUndefined();
    });
  });
}

describe('structure and input errors', () => {
  it('an algebraic loop is an error naming its blocks', () => {
    const d = buildDiagram(
      [
        ['r', 'source', {}],
        ['sum', 'summing-junction', { signs: '+-' }],
        ['k', 'gain', { k: 2 }],
        ['lag', 'first-order-lag', { k: 1, tau: 1 }],
        ['y', 'probe'],
      ],
      ['r -> sum.in1', 'k -> sum.in2', 'sum -> k', 'sum -> lag', 'lag -> y'],
    );
    const model = compileModel(d);
    expect(() => simulate(model, { until: 1 })).toThrowError(/algebraic loop through blocks (sum, k|k, sum)[^,]/);
  });

  it('a lead-lag with feedthrough in a loop is algebraic; with a dead time in the loop it is not', () => {
    const mk = (delay: number) =>
      buildDiagram(
        [
          ['r', 'source', {}],
          ['sum', 'summing-junction', { signs: '+-' }],
          ['ll', 'lead-lag', { k: 1, tLead: 1, tLag: 0.5 }],
          ['dt', 'dead-time', { delay }],
          ['y', 'probe'],
        ],
        ['r -> sum.in1', 'dt -> sum.in2', 'sum -> ll', 'll -> dt', 'll -> y'],
      );
    expect(() => simulate(compileModel(mk(0)), { until: 1 })).toThrowError(/algebraic loop.*\b(ll|sum|dt)\b/);
    expect(simulate(compileModel(mk(0.1)), { until: 1 }).status).toBe('ok');
  });

  it('unconnected inputs, unknown wires and bad options are input errors', () => {
    const d = buildDiagram(
      [
        ['g', 'gain', { k: 1 }],
        ['y', 'probe'],
      ],
      ['g -> y'],
    );
    expect(() => compileModel(d)).toThrowError(/block g: input in is not connected/);
    const ok = compileModel(
      buildDiagram(
        [
          ['r', 'source', {}],
          ['y', 'probe'],
        ],
        ['r -> y'],
      ),
    );
    expect(() => simulate(ok, { until: 0 })).toThrowError(/until/);
    expect(() => simulate(ok, { until: 1, wires: ['nope'] })).toThrowError(/unknown wire "nope"/);
    expect(() => simulate(ok, { until: 1, rtol: -1 })).toThrowError(/rtol/);
    try {
      simulate(ok, { until: Number.NaN });
      expect.unreachable();
    } catch (err) {
      expect((err as { inputError?: boolean }).inputError).toBe(true);
    }
  });
});

describe('compile once, run many', () => {
  it('overrides change the run without recompiling; results equal a freshly compiled edited diagram', () => {
    const mk = (k: number) =>
      buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1 }],
          ['e', 'summing-junction', { signs: '+-' }],
          ['c', 'pid', { form: 'ideal', kp: 'Kp', ti: 2, td: 0.2, umin: -1, umax: 1 }],
          ['p', 'second-order', { k: 1, wn: 1.5, zeta: 0.3 }],
          ['y', 'probe'],
        ],
        ['r -> e.in1', 'p -> e.in2', 'e -> c', 'c -> p', 'p -> y'],
        [{ name: 'Kp', value: k }],
      );
    const model = compileModel(mk(1));
    const a = simulate(model, { until: 10, overrides: { Kp: 3 } });
    const b = simulate(compileModel(mk(3)), { until: 10 });
    expect(a.traces.y).toEqual(b.traces.y);
    const c = simulate(model, { until: 10 });
    expect(c.traces.y).not.toEqual(a.traces.y);
    // the compiled model is not changed by a run: running again repeats the first result
    expect(simulate(model, { until: 10, overrides: { Kp: 3 } }).traces.y).toEqual(a.traces.y);
  });
});

describe('budgets, divergence, stiffness, cancellation, progress', () => {
  const unstable = buildDiagram(
    [
      ['r', 'source', { shape: 'step', amplitude: 1 }],
      ['g', 'transfer-function', { expression: '1/(s - 1)' }],
      ['y', 'probe'],
    ],
    ['r -> g', 'g -> y'],
  );

  it('an unstable diagram stops at the divergence bound with a message naming the block and the time', () => {
    const res = simulate(compileModel(unstable), { until: 100, divergenceBound: 1e6 });
    expect(res.status).toBe('diverged');
    expect(res.message).toMatch(/diverged at t = [\d.]+ s: a state of block g reached/);
    // y = e^t − 1 reaches 1e6 at t = ln(1e6 + 1) (closed form of 1/(s − 1) stepped)
    expect(res.timeReached).toBeGreaterThan(Math.log(1e6 + 1));
    expect(res.timeReached).toBeLessThan(40);
    expect(res.time.length).toBeGreaterThan(10);
    expect(res.time[res.time.length - 1]).toBeLessThanOrEqual(res.timeReached);
    // partial trace is still the right one
    res.time.forEach((t, i) => expect(Math.abs(res.traces.y[i] - (Math.exp(t) - 1))).toBeLessThan(1e-4 * Math.exp(t)));
  });

  it('a stiff diagram (time constants five decades apart) ends within budget: correct result or the stiffness message', () => {
    const d = buildDiagram(
      [
        ['r', 'source', { shape: 'step', amplitude: 1 }],
        ['a', 'first-order-lag', { k: 1, tau: 1 }],
        ['b', 'first-order-lag', { k: 1, tau: 1e-5 }],
        ['y', 'probe'],
      ],
      ['r -> a', 'a -> b', 'b -> y'],
    );
    const maxWallMs = 5000;
    const res = simulate(compileModel(d), { until: 10, maxWallMs });
    expect(res.stats.wallMs).toBeLessThan(maxWallMs);
    expect(res.stats.steps).toBeLessThan(200000);
    if (res.status === 'stiff') {
      expect(res.message).toMatch(/stiff/);
      expect(res.message).toMatch(/at t = /);
    } else {
      expect(res.status).toBe('ok');
      // two lags in series: y = 1 − (τa e^(−t/τa) − τb e^(−t/τb))/(τa − τb) (partial fractions)
      const yEnd = 1 - (Math.exp(-10) - 1e-5 * Math.exp(-10 / 1e-5)) / (1 - 1e-5);
      expect(Math.abs(res.traces.y[res.traces.y.length - 1] - yEnd)).toBeLessThan(1e-5);
    }
    // the partial trace follows the closed form
    res.time.forEach((t, i) => {
      const y = 1 - (Math.exp(-t) - 1e-5 * Math.exp(-t / 1e-5)) / (1 - 1e-5);
      expect(Math.abs(res.traces.y[i] - y)).toBeLessThan(1e-4);
    });
  });

  const oscillator = buildDiagram(
    [
      ['r', 'source', { shape: 'step', amplitude: 1 }],
      ['g', 'second-order', { k: 1, wn: 20, zeta: 0.001 }],
      ['y', 'probe'],
    ],
    ['r -> g', 'g -> y'],
  );

  it('the step budget ends the run with the time reached and the partial traces', () => {
    const res = simulate(compileModel(oscillator), { until: 100, maxSteps: 40 });
    expect(res.status).toBe('budget');
    expect(res.message).toMatch(/step budget of 40 steps ran out at t = /);
    expect(res.timeReached).toBeGreaterThan(0);
    expect(res.timeReached).toBeLessThan(100);
    expect(res.time.length).toBeGreaterThan(1);
  });

  it('the wall-time budget ends the run (odex: a lightly damped oscillator at tight tolerance)', () => {
    const res = simulate(compileModel(oscillator), { until: 2000, maxWallMs: 5, rtol: 1e-10, atol: 1e-12, engine: 'odex' });
    expect(res.engine).toBe('odex');
    expect(res.status).toBe('budget');
    expect(res.message).toMatch(/wall-time budget of 5 ms ran out at t = /);
    expect(res.timeReached).toBeLessThan(2000);
  });

  it('the wall-time budget ends the run (exact: a fast pulse train, one segment per edge)', () => {
    const d = buildDiagram(
      [
        ['r', 'source', { shape: 'pulse', amplitude: 1, width: 5e-4, period: 1e-3 }],
        ['g', 'first-order-lag', { k: 1, tau: 0.01 }],
        ['y', 'probe'],
      ],
      ['r -> g', 'g -> y'],
    );
    const res = simulate(compileModel(d), { until: 1e5, maxWallMs: 5, maxSteps: 1e9 });
    expect(res.engine).toBe('exact');
    expect(res.status).toBe('budget');
    expect(res.message).toMatch(/wall-time budget of 5 ms ran out at t = /);
    expect(res.timeReached).toBeLessThan(1e5);
  });

  it('cancellation is polled; progress is reported in increasing fractions ending at 1', () => {
    let polls = 0;
    // (the exact engine polls every 64 steps: this run's 250 steps poll about five times)
    const cancelled = simulate(compileModel(oscillator), { until: 100, isCancelled: () => ++polls > 2 });
    expect(cancelled.status).toBe('cancelled');
    expect(cancelled.message).toMatch(/cancelled at t = /);
    expect(cancelled.timeReached).toBeLessThan(100);
    const seen: number[] = [];
    const done = simulate(compileModel(oscillator), { until: 20, outputStep: 0.002, onProgress: (f) => seen.push(f) });
    expect(done.status).toBe('ok');
    expect(seen.length).toBeGreaterThan(5);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    expect(seen[seen.length - 1]).toBe(1);
  });
});

describe('sources and recording', () => {
  it('pulse train into an integrator: exact piecewise-linear ramp, edges on the time axis', () => {
    const d = buildDiagram(
      [
        ['r', 'source', { shape: 'pulse', amplitude: 2, start: 0.5, width: 0.3, period: 1 }],
        ['i', 'integrator', { k: 1 }],
        ['y', 'probe'],
      ],
      ['r -> i', 'i -> y'],
    );
    const res = simulate(compileModel(d), { until: 4, outputStep: 0.1, wires: 'all' });
    // ∫ of the pulse train: 2·(time spent high so far)
    const exact = (t: number) => {
      let high = 0;
      for (let k = 0; k < 10; k++) {
        const a = 0.5 + k;
        high += Math.max(0, Math.min(t, a + 0.3) - a);
      }
      return 2 * high;
    };
    res.time.forEach((t, i) => expect(Math.abs(res.traces.y[i] - exact(t))).toBeLessThan(1e-9));
    expect(res.time.some((t) => Math.abs(t - 0.8) < 1e-12)).toBe(true);
    expect(Object.keys(res.traces).sort()).toEqual(['wire:w1', 'wire:w2', 'y']);
    for (let i = 1; i < res.time.length; i++) expect(res.time[i]).toBeGreaterThan(res.time[i - 1]);
  });
});
