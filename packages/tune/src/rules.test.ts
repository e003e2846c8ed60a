import { describe, expect, it } from 'vitest';
import { fopdt, ipdt, sopdt } from '@loopwright/fit';
import { seriesToIdeal } from './controller.ts';
import { amigoRule, lambdaRule, simcRule, zieglerNicholsStepRule } from './rules.ts';

/** An InputError naming the field. */
const fieldError = (field: string) => expect.objectContaining({ inputError: true, details: expect.objectContaining({ field }) });

describe('rules on second-order and integrating models', () => {
  it('SIMC PID on a SOPDT: series kc = τ1/(k(τc + θ)), τI = min(τ1, 4(τc + θ)), τD = τ2, as the ideal form', () => {
    // SIMC (Skogestad 2003), PID rule for second-order processes (series form)
    const s = simcRule(sopdt(2, 10, 3, 1), { controller: 'pid' });
    const want = seriesToIdeal(10 / (2 * 2), 8, 3);
    expect(s.controller).toEqual(want);
    expect(want.kp).toBeCloseTo(2.5 * (1 + 3 / 8), 12);
    expect(want.ti).toBeCloseTo(11, 12);
    expect(want.td).toBeCloseTo(24 / 11, 12);
    expect(s.predicted!.closedLoopStable).toBe(true);
  });

  it('PI on a SOPDT reduces by the half rule first and says so', () => {
    const s = simcRule(sopdt(2, 10, 3, 1));
    expect(s.model).toEqual({ kind: 'fopdt', gain: 2, timeConstants: [11.5], deadTime: 2.5 });
    expect(s.reduction).not.toBeNull();
    expect(s.notes.join(' ')).toContain('half rule');
    expect(s.controller.kp).toBeCloseTo(11.5 / (2 * 5), 12);
    const a = amigoRule(sopdt(2, 10, 3, 1));
    expect(a.model?.kind).toBe('fopdt');
  });

  it('lambda on an integrating process: ti = 2λ + θ, kc = ti/(k′(λ + θ)²); default λ = 3θ', () => {
    const s = lambdaRule(ipdt(0.5, 2));
    expect(s.settings.lambda).toBe(6);
    expect(s.controller.ti).toBeCloseTo(14, 12);
    expect(s.controller.kp).toBeCloseTo(14 / (0.5 * 64), 12);
    expect(s.predicted!.closedLoopStable).toBe(true);
  });

  it('lambda IMC-PID on a FOPDT: kc = (2τ + θ)/(K(2λ + θ)), ti = τ + θ/2, td = τθ/(2τ + θ)', () => {
    // Rivera, Morari & Skogestad (1986) (from memory)
    const s = lambdaRule(fopdt(2, 10, 1), { controller: 'pid', lambda: 2 });
    expect(s.controller.kp).toBeCloseTo(21 / 10, 12);
    expect(s.controller.ti).toBeCloseTo(10.5, 12);
    expect(s.controller.td).toBeCloseTo(10 / 21, 12);
  });

  it('a negative process gain gives reverse action (kp < 0) and the same margins', () => {
    const pos = simcRule(fopdt(2, 10, 1));
    const neg = simcRule(fopdt(-2, 10, 1));
    expect(neg.controller.kp).toBe(-pos.controller.kp);
    expect(neg.predicted!.ms).toBeCloseTo(pos.predicted!.ms!, 9);
  });

  it('errors name the field: no dead time for the default τc, a rule without P settings, a bad τc', () => {
    expect(() => simcRule(fopdt(1, 5, 0))).toThrow(fieldError('tauC'));
    expect(() => simcRule(fopdt(1, 5, 1), { controller: 'p' })).toThrow(fieldError('controller'));
    expect(() => simcRule(fopdt(1, 5, 1), { tauC: -1 })).toThrow(fieldError('tauC'));
    expect(() => amigoRule(fopdt(1, 5, 0))).toThrow(fieldError('deadTime'));
    expect(() => zieglerNicholsStepRule({ kind: 'fopdt', gain: 1, timeConstants: [], deadTime: 1 })).toThrow(fieldError('timeConstants'));
    expect(simcRule(fopdt(1, 5, 0), { tauC: 2 }).controller.kp).toBeCloseTo(2.5, 12);
  });
});
