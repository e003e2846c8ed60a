import { describe, expect, it } from 'vitest';
import { parseForDisplay } from './formula.tsx';
import { cardContent } from './block-formula.ts';

// The display parser follows ordinary operator precedence (common practice, no source).
describe('parseForDisplay', () => {
  it('binds ^ tighter than * and / tighter than +', () => {
    const e = parseForDisplay('1 + 2*s^2/3');
    expect(e).toEqual({
      t: 'bin', op: '+', a: { t: 'num', v: '1' },
      b: { t: 'bin', op: '/', a: { t: 'bin', op: '*', a: { t: 'num', v: '2' }, b: { t: 'bin', op: '^', a: { t: 'name', v: 's' }, b: { t: 'num', v: '2' } } }, b: { t: 'num', v: '3' } },
    });
  });
  it('keeps exp calls and parentheses; refuses junk', () => {
    expect(parseForDisplay('exp(-T*s)')).toMatchObject({ t: 'call', f: 'exp' });
    expect(parseForDisplay('(s+1)')).toMatchObject({ t: 'paren' });
    expect(parseForDisplay('2*#')).toBeNull();
    expect(parseForDisplay('2*(s+1')).toBeNull();
  });
  it('builds card formulas from block parameters', () => {
    const lag = cardContent({ id: 'a', kind: 'first-order-lag', position: { x: 0, y: 0 }, params: { k: 2, tau: 'T1' } });
    expect(lag.formula).toBe('2/(T1*s + 1)');
    const pid = cardContent({ id: 'p', kind: 'pid', position: { x: 0, y: 0 }, params: { form: 'ideal', kp: 'Kp', ti: 1.5, td: 0, n: 10, umin: '', umax: '' } });
    expect(pid.formula).toBe('Kp*(1 + 1/(1.5*s))');
    expect(parseForDisplay(pid.formula!)).not.toBeNull();
    // Small and large numbers in engineering notation, still readable by the display parser.
    const tiny = cardContent({ id: 'g', kind: 'first-order-lag', position: { x: 0, y: 0 }, params: { k: 2.5e-5, tau: 120000 } });
    expect(tiny.formula).toBe('25e-6/(120e3*s + 1)');
    expect(parseForDisplay(tiny.formula!)).not.toBeNull();
  });
  it('a sampled controller card shows its sample time and computation delay', () => {
    const pid = cardContent({ id: 'p', kind: 'pid', position: { x: 0, y: 0 }, params: { form: 'ideal', kp: 2, ti: 0.01, td: 0, n: 10, umin: -5, umax: 5, sampleTime: 2.5e-4, computeDelay: 1 } });
    expect(pid.formula).toBe('2*(1 + 1/(0.01*s))');
    expect(pid.caption).toBe('output -5 … 5; sampled every 250e-6 s, delay 1 sample');
    const g = cardContent({ id: 'g', kind: 'gain', position: { x: 0, y: 0 }, params: { k: 3, sampleTime: 'Ts_pos' } });
    expect(g.caption).toBe('sampled every Ts_pos s');
    expect(cardContent({ id: 'g', kind: 'gain', position: { x: 0, y: 0 }, params: { k: 3, sampleTime: '' } }).caption).toBeUndefined();
  });
});
