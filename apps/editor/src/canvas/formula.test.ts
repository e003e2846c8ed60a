import { describe, expect, it } from 'vitest';
import { parseForDisplay } from './formula.tsx';
import { blockKinds, blockSpec } from '@loopwright/graph';
import { defaultParams } from '../store/graph-bridge.ts';

// The display parser follows ordinary operator precedence (common practice, no source).
describe('parseForDisplay', () => {
  it('binds ^ tighter than * and / tighter than +', () => {
    const e = parseForDisplay('1 + 2*s^2/3');
    expect(e).toEqual({
      t: 'bin',
      op: '+',
      a: { t: 'num', v: '1' },
      b: {
        t: 'bin',
        op: '/',
        a: { t: 'bin', op: '*', a: { t: 'num', v: '2' }, b: { t: 'bin', op: '^', a: { t: 'name', v: 's' }, b: { t: 'num', v: '2' } } },
        b: { t: 'num', v: '3' },
      },
    });
  });
  it('keeps exp calls and parentheses; refuses junk', () => {
    expect(parseForDisplay('exp(-T*s)')).toMatchObject({ t: 'call', f: 'exp' });
    expect(parseForDisplay('(s+1)')).toMatchObject({ t: 'paren' });
    expect(parseForDisplay('2*#')).toBeNull();
    expect(parseForDisplay('2*(s+1')).toBeNull();
  });
  it('can draw every card formula the catalogue writes', () => {
    // BlockSpec.card returns expression texts; the card renders them through this parser.
    for (const kind of blockKinds) {
      const f = blockSpec(kind).card(defaultParams(kind)).formula;
      if (f !== undefined && f !== '') expect(parseForDisplay(f), `${kind}: ${f}`).not.toBeNull();
    }
    const pid = blockSpec('pid').card({ form: 'parallel', kp: 'Kp', ki: 2, kd: 0.1, n: 10, umin: -1, umax: 1 });
    expect(parseForDisplay(pid.formula!)).not.toBeNull();
  });
});
