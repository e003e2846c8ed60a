import { describe, expect, it } from 'vitest';
import { parseTransferFunction, poly, tfFromCoefficients } from '@loopwright/lti';
import { fopdt } from '@loopwright/fit';
import { processModelOf, suggestTuning, tuneSummary } from './suggest.ts';

/** An InputError whose message contains the text. */
const inputError = (text: string) => expect.objectContaining({ inputError: true, message: expect.stringContaining(text) });

describe('suggestTuning, the apps’ entry point', () => {
  it('reads FOPDT-, SOPDT- and IPDT-shaped loops exactly, others by the half rule', () => {
    expect(processModelOf(parseTransferFunction('2*exp(-1.5*s)/(5*s+1)')).model).toEqual(fopdt(2, 5, 1.5));
    expect(
      processModelOf(parseTransferFunction('0.8*exp(-20*s)/((90*s+1)*(12*s+1))')).model.timeConstants.map((t) => +t.toFixed(9)),
    ).toEqual([90, 12]);
    expect(processModelOf(parseTransferFunction('0.4*exp(-2*s)/s')).model).toMatchObject({ kind: 'ipdt', deadTime: 2 });
    const three = processModelOf(tfFromCoefficients([1], poly.mul(poly.mul([1, 4], [1, 2]), [1, 1])));
    expect(three.reduction).not.toBeNull();
    expect(three.model.kind).toBe('fopdt');
    expect(processModelOf(tfFromCoefficients([1], poly.mul(poly.mul([1, 4], [1, 2]), [1, 1])), 'pid').model.kind).toBe('sopdt');
  });

  it('gives the CLI fields: rule, controller {kp, ti, td}, the model used, predicted {ms, gainMargin, phaseMarginDeg, delayMargin}', () => {
    const s = tuneSummary(suggestTuning({ rule: 'simc', plant: parseTransferFunction('2*exp(-1*s)/(10*s+1)') }));
    expect(s.rule).toBe('simc');
    expect(s.controller).toEqual({ kp: 2.5, ti: 8, td: 0, n: 10 });
    expect(s.model).toEqual(fopdt(2, 10, 1));
    expect(Object.keys(s.predicted!)).toEqual(['ms', 'gainMargin', 'phaseMarginDeg', 'delayMargin', 'closedLoopStable']);
    expect(JSON.parse(JSON.stringify(s))).toEqual(s);
  });

  it('runs the Ms tuner on a model or a loop, and says what is missing', () => {
    const a = suggestTuning({ rule: 'ms', model: fopdt(2, 10, 1) });
    const b = suggestTuning({ rule: 'ms', plant: parseTransferFunction('2*exp(-s)/(10*s+1)') });
    expect(a.controller.kp).toBeCloseTo(b.controller.kp, 9);
    expect(a.model).toEqual(fopdt(2, 10, 1));
    expect(() => suggestTuning({ rule: 'ms' })).toThrow(inputError('needs the loop'));
    expect(() => suggestTuning({ rule: 'zn-ultimate', plant: parseTransferFunction('1/(s+1)') })).toThrow(inputError('no phase crossover'));
    expect(() => suggestTuning({ rule: 'simc' })).toThrow(inputError('needs a process model'));
    expect(() => suggestTuning({ rule: 'fast' as never })).toThrow(inputError("'fast' is not one of"));
  });
});
