import { describe, expect, it } from 'vitest';
import { poly, tfFromCoefficients } from '@loopwright/lti';
import { halfRule, halfRuleOf, processFactors, reduceModel } from './half-rule.ts';
import { sopdt } from './process-model.ts';

/** An InputError whose message contains the text. */
const inputError = (text: string) => expect.objectContaining({ inputError: true, message: expect.stringContaining(text) });

describe('half rule', () => {
  it('sends inverse-response time constants and half the sample time to the dead time', () => {
    // SIMC (Skogestad 2003): (−T s + 1) ≈ e^(−Ts); sampling adds h/2 (from memory).
    const r = halfRule({ gain: 3, lags: [10, 2, 0.5], inverseResponse: [0.7], deadTime: 1 }, 'fopdt', { sampleTime: 0.2 });
    expect(r.model.timeConstants[0]).toBeCloseTo(11, 12);
    expect(r.model.deadTime).toBeCloseTo(1 + 1 + 0.5 + 0.7 + 0.1, 12);
    expect(r.lags.map((l) => [l.toLag, l.toDeadTime])).toEqual([
      [10, 0],
      [1, 1],
      [0, 0.5],
    ]);
  });

  it('factors a transfer function: RHP zeros are inverse response, the gain in time-constant form', () => {
    // 3(1 − 0.7s)e^(−s)/((10s + 1)(2s + 1)(0.5s + 1))
    const tf = tfFromCoefficients(poly.scale([1, -0.7], 3), poly.mul(poly.mul([1, 10], [1, 2]), [1, 0.5]), 1);
    const f = processFactors(tf);
    expect(f.gain).toBeCloseTo(3, 12);
    expect([...f.lags].sort((a, b) => b - a).map((x) => +x.toFixed(9))).toEqual([10, 2, 0.5]);
    expect(f.inverseResponse?.[0]).toBeCloseTo(0.7, 12);
    expect(f.integrating).toBe(false);
    const m = halfRuleOf(tf, 'sopdt').model;
    expect(m.timeConstants[0]).toBeCloseTo(10, 9);
    expect(m.timeConstants[1]).toBeCloseTo(2.25, 9);
    expect(m.deadTime).toBeCloseTo(1 + 0.25 + 0.7, 9);
  });

  it('an integrator keeps the integrating form; half the largest lag goes to the dead time', () => {
    // 0.2e^(−2s)/(s(4s + 1)(s + 1)) → IPDT k′ = 0.2, θ = 2 + 4/2 + 1
    const tf = tfFromCoefficients([0.2], poly.mul(poly.mul([0, 1], [1, 4]), [1, 1]), 2);
    const m = halfRuleOf(tf, 'ipdt').model;
    expect(m.kind).toBe('ipdt');
    expect(m.gain).toBeCloseTo(0.2, 12);
    expect(m.deadTime).toBeCloseTo(5, 9);
  });

  it('reduces a fitted SOPDT to FOPDT', () => {
    const m = reduceModel(sopdt(2, 4, 1, 0.5), 'fopdt').model;
    expect(m.timeConstants[0]).toBe(4.5);
    expect(m.deadTime).toBe(1);
  });

  it('says why it cannot reduce a process', () => {
    expect(() => halfRuleOf(tfFromCoefficients([1, 2], [1, 3, 2]), 'fopdt')).toThrow(inputError('left-half-plane zero at s = -0.5000'));
    expect(() => halfRuleOf(tfFromCoefficients([1], [1, 0.2, 1]), 'fopdt')).toThrow(inputError('complex pole pair'));
    expect(() => halfRuleOf(tfFromCoefficients([1], [-1, 1]), 'fopdt')).toThrow(inputError('unstable pole'));
    expect(() => halfRuleOf(tfFromCoefficients([1], [0, 0, 1]), 'ipdt')).toThrow(inputError('2 integrators'));
    expect(() => halfRule({ gain: 1, lags: [1] }, 'sopdt')).toThrow(inputError('keeps 2 lags, but the process has 1'));
    expect(() => halfRule({ gain: 1, lags: [1], integrating: true }, 'fopdt')).toThrow(inputError("reduces to 'ipdt'"));
  });
});
