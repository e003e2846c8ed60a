import { describe, expect, it } from 'vitest';
import { checkAnalytic } from './analytic.ts';
import { diagramOf } from '../analysis/test-diagrams.ts';

const loop = (controller: Record<string, string | number>, plant: string, kind: 'transfer-function' | 'gain' = 'transfer-function') =>
  diagramOf(
    [
      ['r', 'source'],
      ['e', 'summing-junction', { signs: '+-' }],
      ['C', kind, controller],
      ['P', 'transfer-function', { expression: plant }],
      ['y', 'probe'],
    ],
    ['r->e.in1', 'e->C', 'C->P', 'fb:P->e.in2', 'P->y'],
  );

describe('analytical checks', () => {
  it('an algebraic loop is reported with its blocks; loop gain 1 at s → ∞ is an ill-posed error', () => {
    // Well-posedness of an interconnection: 1 − (loop gain at s → ∞) ≠ 0 (e.g. Zhou, Doyle &
    // Glover, Robust and Optimal Control, 1996, Sec. 5.2 (from memory)).
    const mk = (signs: string, k: number) =>
      diagramOf(
        [
          ['r', 'source'],
          ['e', 'summing-junction', { signs }],
          ['K', 'gain', { k }],
          ['y', 'probe'],
        ],
        ['r->e.in1', 'e->K', 'K->e.in2', 'K->y'],
      );
    const ok = checkAnalytic(mk('+-', 2));
    const alg = ok.find((f) => f.code === 'algebraic-loop')!;
    expect(alg.severity).toBe('warning');
    expect(alg.blocks!.sort()).toEqual(['K', 'e']);
    expect(ok.some((f) => f.severity === 'error')).toBe(false);
    const bad = checkAnalytic(mk('++', 1));
    const ill = bad.find((f) => f.code === 'ill-posed-algebraic-loop')!;
    expect(ill.severity).toBe('error');
    expect(ill.blocks!.sort()).toEqual(['K', 'e']);
  });

  it('a dead time breaks an algebraic loop', () => {
    const d = diagramOf(
      [
        ['r', 'source'],
        ['e', 'summing-junction', { signs: '++' }],
        ['K', 'gain', { k: 1 }],
        ['T', 'dead-time', { delay: 0.1 }],
        ['y', 'probe'],
      ],
      ['r->e.in1', 'e->K', 'K->T', 'T->e.in2', 'K->y'],
    );
    expect(checkAnalytic(d).some((f) => f.code.includes('algebraic'))).toBe(false);
  });

  it('a controller zero cancelling an unstable plant pole is an internal-instability error', () => {
    // Internal stability: an RHP pole–zero cancellation leaves an unstable hidden mode (Skogestad &
    // Postlethwaite, Sec. 4.7 (from memory)).
    const f = checkAnalytic(loop({ expression: '(s-1)/(s+1)' }, '1/(s-1)'));
    const e = f.find((x) => x.code === 'unstable-cancellation')!;
    expect(e.severity).toBe('error');
    expect(e.blocks).toEqual(['P', 'C']);
    expect(e.message).toMatch(/pole 1 of block P/);
  });

  it('a stable cancellation is only information', () => {
    const f = checkAnalytic(loop({ expression: '(s+2)/(s+5)' }, '1/(s+2)'));
    const c = f.find((x) => x.code === 'pole-zero-cancellation')!;
    expect(c.severity).toBe('info');
    expect(f.some((x) => x.severity === 'error')).toBe(false);
  });

  it('closed-loop instability is a warning: R10 has two right-half-plane poles', () => {
    // G = 1000/((s+2)(s+3)(s+5)) with unity feedback: Routh gives 2 RHP poles (Nise, Sec. 6.2, Example 6.1 (from memory)) [R10]
    const f = checkAnalytic(loop({ k: 1 }, '1000/((s+2)*(s+3)*(s+5))', 'gain'));
    const w = f.find((x) => x.code === 'closed-loop-unstable')!;
    expect(w.severity).toBe('warning');
    expect(w.message).toMatch(/^closed loop unstable: 2 pole/);
    // Stable with a gain of 0.05 (1000·0.05 = 50 < the Routh limit 288 of s³ + 10s² + 31s + 30 + K).
    expect(checkAnalytic(loop({ k: 0.05 }, '1000/((s+2)*(s+3)*(s+5))', 'gain')).some((x) => x.code === 'closed-loop-unstable')).toBe(false);
  });

  it('a bad field gives one error finding naming the block instead of throwing', () => {
    const f = checkAnalytic(loop({ expression: '1/(s+' }, '1/(s+1)'));
    expect(f.length).toBe(1);
    expect(f[0].severity).toBe('error');
    expect(f[0].message).toMatch(/block C/);
  });
});
