import { describe, expect, it } from 'vitest';
import { parseTransferFunction } from '@loopwright/lti';
import { fopdt, formatNumber, ipdt, modelExpression, processModel, processTransfer, sopdt } from './process-model.ts';

/** An InputError naming the field. */
const fieldError = (field: string) => expect.objectContaining({ inputError: true, details: expect.objectContaining({ field }) });

describe('process models', () => {
  it('keep lags largest first and check their numbers', () => {
    expect(sopdt(1, 2, 9, 0).timeConstants).toEqual([9, 2]);
    expect(() => fopdt(0, 1, 1)).toThrow(fieldError('gain'));
    expect(() => fopdt(1, -1, 1)).toThrow(fieldError('timeConstants'));
    expect(() => fopdt(1, 1, -0.1)).toThrow(fieldError('deadTime'));
    expect(() => processModel('fopdt', 1, [1, 2], 0)).toThrow(fieldError('timeConstants'));
    expect(() => processModel('pt1' as never, 1, [1], 0)).toThrow(fieldError('model'));
  });

  it('write expressions the editor parses back to the same transfer function', () => {
    expect(modelExpression(fopdt(2, 5, 1.5))).toBe('2*exp(-1.5*s)/(5*s+1)');
    expect(modelExpression(sopdt(0.8, 90, 12, 20))).toBe('0.8*exp(-20*s)/((90*s+1)*(12*s+1))');
    expect(modelExpression(ipdt(0.4, 2))).toBe('0.4*exp(-2*s)/s');
    expect(modelExpression(fopdt(-3, 7, 0))).toBe('-3/(7*s+1)');
    expect(formatNumber(1.23456789e-7)).toBe('1.23457e-7');
    expect(formatNumber(4.5e21)).toBe('4.5e21');
    for (const m of [fopdt(2, 5, 1.5), sopdt(-0.35, 120.5, 1e-3, 3.25e-4), ipdt(4.5e21, 7e-9)]) {
      const tf = parseTransferFunction(modelExpression(m));
      const want = processTransfer(m);
      expect(tf.delay).toBeCloseTo(m.deadTime, 12);
      tf.rational.den.forEach((c, i) =>
        expect(Math.abs(c - want.rational.den[i])).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(want.rational.den[i]))),
      );
      expect(tf.rational.num[0] / want.rational.num[0]).toBeCloseTo(1, 12);
    }
  });
});
