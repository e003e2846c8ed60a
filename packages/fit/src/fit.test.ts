import { describe, expect, it } from 'vitest';
import { parseTransferFunction } from '@loopwright/lti';
import { fitProcessModel, fitSummary } from './fit.ts';
import { type ProcessModel, fopdt, ipdt, processTransfer, sopdt } from './process-model.ts';
import { seededGaussian } from './demos/seeded-noise.ts';

// Exact data come from closed-form responses superposed here (not from the fit's own
// simulation in response.ts), so recovery tests check the simulation as well as the search.

/** Unit-step response of the model's dynamics at t (0 for t ≤ 0, before the dead time). */
function stepAt(m: ProcessModel, t: number): number {
  const s = t - m.deadTime;
  if (s <= 0) return 0;
  if (m.kind === 'ipdt') return m.gain * s;
  if (m.kind === 'fopdt') return m.gain * (1 - Math.exp(-s / m.timeConstants[0]));
  const [a, b] = m.timeConstants;
  return m.gain * (1 - (a * Math.exp(-s / a) - b * Math.exp(-s / b)) / (a - b));
}

/** Unit-ramp response (input t for t ≥ 0). */
function rampAt(m: ProcessModel, t: number): number {
  const s = t - m.deadTime;
  if (s <= 0) return 0;
  if (m.kind === 'ipdt') return (m.gain * s * s) / 2;
  if (m.kind === 'fopdt') {
    const T = m.timeConstants[0];
    return m.gain * (s - T + T * Math.exp(-s / T));
  }
  const [a, b] = m.timeConstants;
  return m.gain * (s - (a + b) + (a * a * Math.exp(-s / a) - b * b * Math.exp(-s / b)) / (a - b));
}

const times = (n: number, dt: number, t0 = 0) => Array.from({ length: n }, (_, i) => t0 + i * dt);

/** A double step: +size1 at t1, +size2 at t2, around the operating point (u0, y0). */
function doubleStepLog(m: ProcessModel, t: number[], u0: number, y0: number, steps: [number, number][]) {
  const input = t.map((x) => u0 + steps.reduce((a, [at, size]) => a + (x >= at ? size : 0), 0));
  const output = t.map((x) => y0 + steps.reduce((a, [at, size]) => a + size * stepAt(m, x - at), 0));
  return { time: t, input, output };
}

function expectModel(got: ProcessModel, want: ProcessModel, tol: number) {
  expect(got.kind).toBe(want.kind);
  expect(Math.abs(got.gain - want.gain)).toBeLessThanOrEqual(tol * Math.abs(want.gain));
  got.timeConstants.forEach((t, i) => expect(Math.abs(t - want.timeConstants[i])).toBeLessThanOrEqual(tol * want.timeConstants[i]));
  expect(Math.abs(got.deadTime - want.deadTime)).toBeLessThanOrEqual(tol * Math.max(1, want.deadTime));
}

describe('fitProcessModel: exact recovery from exact data (automatic starts)', () => {
  // A double step (up, then part of the way back) on a log that starts at an operating point.
  const cases: [string, ProcessModel][] = [
    ['FOPDT', fopdt(-1.8, 12, 3.7)],
    ['SOPDT', sopdt(0.6, 20, 5, 2.3)],
    ['IPDT', ipdt(0.05, 4.2)],
  ];
  for (const [name, truth] of cases) {
    it(`${name}, input held between samples, double step`, () => {
      const t = times(241, 0.5, 100);
      const log = doubleStepLog(truth, t, 35, 62, [
        [110, 4],
        [150, -2.5],
      ]);
      const f = fitProcessModel(log, { model: truth.kind, between: 'hold' });
      expectModel(f.model, truth, 1e-6);
      expect(f.nrmse).toBeLessThan(1e-7);
      expect(f.operatingPoint.input).toBe(35);
      expect(f.operatingPoint.samples).toBe(20);
      expect(Math.abs(f.operatingPoint.output - 62)).toBeLessThanOrEqual(1e-6);
      expect(f.converged).toBe(true);
    });
  }

  it('SOPDT, input linear between samples: two ramps of different slopes', () => {
    const truth = sopdt(2.5, 9, 3, 1.6);
    const t = times(301, 0.25);
    // Ramp up by 1 over [5, 7], then down by 0.4 over [30, 31]: slopes 0.5 and −0.4.
    const u = (x: number) => 0.5 * (Math.max(0, x - 5) - Math.max(0, x - 7)) - 0.4 * (Math.max(0, x - 30) - Math.max(0, x - 31));
    const y = (x: number) => 0.5 * (rampAt(truth, x - 5) - rampAt(truth, x - 7)) - 0.4 * (rampAt(truth, x - 30) - rampAt(truth, x - 31));
    const f = fitProcessModel({ time: t, input: t.map(u), output: t.map(y) }, { model: 'sopdt' });
    expect(f.between).toBe('linear');
    expectModel(f.model, truth, 1e-6);
  });

  it('a pulse (the input returns to where it was) still fits, from the grid start', () => {
    const truth = fopdt(1.2, 8, 2);
    const t = times(200, 0.5);
    const log = doubleStepLog(truth, t, 0, 0, [
      [5, 1],
      [15, -1],
    ]);
    const f = fitProcessModel(log, { model: 'fopdt', between: 'hold' });
    expect(f.twoPoint).toBeNull();
    expectModel(f.model, truth, 1e-6);
  });
});

describe('fitProcessModel: noisy data', () => {
  it('recovers a FOPDT within 2 % from 1 % noise, with the truth inside its 95 % intervals', () => {
    const truth = fopdt(2, 5, 1.5);
    const t = times(400, 0.1);
    const noise = seededGaussian(7);
    const log = doubleStepLog(truth, t, 0, 0, [[1, 1]]);
    log.output = log.output.map((v) => v + 0.02 * noise());
    const f = fitProcessModel(log, { model: 'fopdt', between: 'hold' });
    expectModel(f.model, truth, 0.02);
    const [k, tau, theta] = [f.intervals.gain!, f.intervals.timeConstants[0]!, f.intervals.deadTime!];
    expect(k[0] < 2 && 2 < k[1]).toBe(true);
    expect(tau[0] < 5 && 5 < tau[1]).toBe(true);
    expect(theta[0] < 1.5 && 1.5 < theta[1]).toBe(true);
    // RMS of the residuals ≈ the noise σ (white noise, right model).
    expect(Math.abs(f.rmse - 0.02)).toBeLessThan(0.003);
    expect(Math.abs(f.residualCorrelation)).toBeLessThan(0.2);
    expect(f.warnings).toEqual([]);
  });

  it('95 % intervals cover the true parameters in about 95 % of seeded noisy logs', () => {
    // A check of the interval machinery (t quantile, Jacobian, s²): with white noise and the
    // right model the linearised intervals should cover the truth at close to their level.
    // 40 seeds; fewer than 34 covers would happen with probability < 2 % at a true 95 %
    // (binomial tail, computed here from the binomial distribution).
    const truth = fopdt(1, 4, 1);
    const t = times(150, 0.2);
    const base = doubleStepLog(truth, t, 0, 0, [[1, 1]]);
    const covered = [0, 0, 0];
    for (let seed = 1; seed <= 40; seed++) {
      const noise = seededGaussian(seed);
      const f = fitProcessModel({ ...base, output: base.output.map((v) => v + 0.03 * noise()) }, { model: 'fopdt', between: 'hold' });
      const iv = [f.intervals.gain!, f.intervals.timeConstants[0]!, f.intervals.deadTime!];
      [1, 4, 1].forEach((v, j) => {
        if (iv[j][0] <= v && v <= iv[j][1]) covered[j]++;
      });
    }
    let tail = 0;
    for (let k = 0; k <= 33; k++) tail += binomial(40, k) * 0.95 ** k * 0.05 ** (40 - k);
    expect(tail).toBeLessThan(0.02);
    for (const c of covered) expect(c).toBeGreaterThanOrEqual(34);
  });

  it('warns when the output does not respond (gain within the noise) and when the model misses dynamics', () => {
    const t = times(200, 0.5);
    const noise = seededGaussian(3);
    const flat = { time: t, input: t.map((x) => (x >= 10 ? 1 : 0)), output: t.map(() => 0.1 * noise()) };
    const f = fitProcessModel(flat, { model: 'fopdt' });
    expect(f.warnings.some((w) => w.startsWith('the gain is not distinguishable from zero'))).toBe(true);
    const lagging = doubleStepLog(sopdt(1, 10, 8, 1), t, 0, 0, [[5, 1]]);
    const g = fitProcessModel(lagging, { model: 'ipdt' });
    expect(g.warnings.some((w) => w.startsWith('the residuals are strongly correlated'))).toBe(true);
  });
});

describe('fit results', () => {
  const truth = sopdt(0.8, 30, 6, 4);
  const t = times(300, 1);
  const log = doubleStepLog(truth, t, 20, 45, [[10, 5]]);
  const noise = seededGaussian(11);
  log.output = log.output.map((v) => v + 0.01 * noise());
  const f = fitProcessModel(log, { model: 'sopdt', between: 'hold' });

  it('residuals are measured − fitted; nrmse is the RMS residual over the output range', () => {
    f.residuals.forEach((r, i) => expect(r).toBeCloseTo(log.output[i] - f.fitted[i], 12));
    const rms = Math.sqrt(f.residuals.reduce((a, r) => a + r * r, 0) / f.residuals.length);
    expect(f.nrmse).toBeCloseTo(rms / (Math.max(...log.output) - Math.min(...log.output)), 12);
    expect(f.time).toEqual(t);
    expect(f.degreesOfFreedom).toBe(300 - 5); // gain, two lags, dead time, initial output
  });

  it('the expression parses back (lti parser) to the fitted model', () => {
    const tf = parseTransferFunction(f.expression);
    const want = processTransfer(f.model);
    expect(Math.abs(tf.delay - f.model.deadTime)).toBeLessThanOrEqual(1e-5 * f.model.deadTime);
    tf.rational.den.forEach((c, i) =>
      expect(Math.abs(c - want.rational.den[i])).toBeLessThanOrEqual(1e-5 * Math.abs(want.rational.den[i]) + 1e-12),
    );
    expect(Math.abs(tf.rational.num[0] - want.rational.num[0])).toBeLessThanOrEqual(1e-5 * Math.abs(want.rational.num[0]));
  });

  it('the CLI summary holds model, gain, timeConstants (largest first), deadTime, nrmse, intervals, expression', () => {
    const s = fitSummary(f);
    expect(s.model).toBe('sopdt');
    expect(s.timeConstants[0]).toBeGreaterThan(s.timeConstants[1]);
    expect(s.intervals.timeConstants).toHaveLength(2);
    expect(JSON.parse(JSON.stringify(s))).toEqual(s);
  });
});

/** An InputError naming the field. */
const fieldError = (field: string) => expect.objectContaining({ inputError: true, details: expect.objectContaining({ field }) });

describe('fitProcessModel: bad options', () => {
  const t = times(20, 1);
  const log = doubleStepLog(fopdt(1, 2, 0), t, 0, 0, [[3, 1]]);
  it('names the field', () => {
    expect(() => fitProcessModel(log, { model: 'pid' as never })).toThrow(fieldError('model'));
    expect(() => fitProcessModel(log, { model: 'fopdt', between: 'cubic' as never })).toThrow(fieldError('between'));
    expect(() => fitProcessModel(log, { model: 'fopdt', confidence: 1.5 })).toThrow(fieldError('confidence'));
    expect(() => fitProcessModel(log, { model: 'fopdt', start: ipdt(1, 0) })).toThrow(fieldError('start'));
    expect(() => fitProcessModel({ ...log, output: log.output.map(() => 3) }, { model: 'fopdt' })).toThrow(fieldError('output'));
  });
});

function binomial(n: number, k: number): number {
  let c = 1;
  for (let i = 1; i <= k; i++) c = (c * (n - k + i)) / i;
  return c;
}
