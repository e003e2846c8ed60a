/** Sweep targets, the slider mapping and range edits (one rule for the editor and the command line). */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { sweepRange } from '@loopwright/graph';
import { editedRange, positionToValue, valueToPosition, widenedRange } from './slider.ts';
import {
  documentValue,
  engineDiagram,
  engineParameterName,
  parseTargetKey,
  preferredChoice,
  resolveSweep,
  sweepChoices,
  targetKey,
  targetRange,
  withLiveValue,
} from './sweep-target.ts';
import { build, unityLoop } from './testing.ts';

describe('slider mapping', () => {
  it('log and linear ranges map ends to ends and round-trip (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1e-3, max: 1e3, noNaN: true }),
        fc.double({ min: 1.01, max: 1e4, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (a, ratio, p) => {
          for (const scale of ['log', 'linear'] as const) {
            const r = { min: a, max: a * ratio, scale };
            expect(positionToValue(r, 0)).toBeCloseTo(r.min, 9);
            expect(positionToValue(r, 1) / r.max).toBeCloseTo(1, 9);
            expect(valueToPosition(r, positionToValue(r, p))).toBeCloseTo(p, 9);
          }
        },
      ),
      { numRuns: 200 },
    );
  });
  it('a log slider puts the geometric mean in the middle (definition of a log scale)', () => {
    expect(positionToValue({ min: 1, max: 100, scale: 'log' }, 0.5)).toBeCloseTo(10, 12);
    expect(positionToValue({ min: -1, max: 3, scale: 'log' }, 0.5)).toBeCloseTo(1, 12); // through zero: linear
  });
  it('range edits keep the document rule: max above min, a log scale only with min > 0', () => {
    expect(editedRange({ min: 1, max: 10, scale: 'log' }, { max: 0.5 })).toBeNull();
    expect(editedRange({ min: 1, max: 10, scale: 'log' }, { min: -2 })).toEqual({ min: -2, max: 10, scale: 'linear' });
    expect(widenedRange({ min: 1, max: 10, scale: 'log' }, 5)).toBeNull();
    expect(widenedRange({ min: 1, max: 10, scale: 'log' }, 40)).toEqual({ min: 1, max: 80, scale: 'log' });
    expect(widenedRange({ min: 1, max: 10, scale: 'log' }, -3)).toEqual({ min: -3.6, max: 10, scale: 'linear' });
  });
});

describe('sweep targets', () => {
  it('lists named parameters and numeric gain blocks; a gain block becomes a synthetic parameter', () => {
    const d = unityLoop(2);
    d.blocks[2].params.k = 3; // a numeric gain
    const c = sweepChoices(d);
    expect(c.map((x) => x.key)).toEqual(['param:K', 'block:k.k']);
    const t = c[1].target;
    const e = engineDiagram(d, t);
    const name = engineParameterName(t);
    expect(e.parameters.find((p) => p.name === name)?.value).toBe(3);
    expect(e.blocks.find((b) => b.id === 'k')?.params.k).toBe(name);
    expect(documentValue(d, t)).toBe(3);
    expect(d.blocks[2].params.k).toBe(3); // the document is untouched
    expect(parseTargetKey(targetKey(t))).toEqual(t);
    expect(parseTargetKey('K')).toEqual({ kind: 'parameter', name: 'K' });
  });
  it('one range rule for every caller (graph sweepRange): a negative gain gets a linear decade either side', () => {
    const d = unityLoop(2);
    d.blocks[2].params.k = -4;
    const t = { kind: 'block' as const, block: 'k', field: 'k' as const };
    expect(targetRange(d, t)).toEqual({ min: -40, max: -0.4, scale: 'linear' });
    expect(targetRange(d, t)).toEqual(sweepRange(engineDiagram(d, t), engineParameterName(t), -4));
    // A parameter's own slider range wins over the default; a sweep of it wins over both.
    expect(targetRange(unityLoop(2), { kind: 'parameter', name: 'K' })).toEqual({ min: 0.1, max: 10, scale: 'log' });
  });
  it("the sweep in force: the UI key, else the diagram's active sweep, else the first choice; a live value is held", () => {
    const d = build(
      [
        ['a', 'gain', { k: 'A' }],
        ['b', 'gain', { k: 'B' }],
      ],
      ['a->b'],
      [
        { name: 'A', value: 1 },
        { name: 'B', value: 2 },
      ],
      {
        sweeps: [{ id: 's', parameter: 'B', min: 1, max: 4, scale: 'log' }],
      },
    );
    expect(preferredChoice(d)?.key).toBe('param:B');
    const r = resolveSweep(d, { key: null, liveValue: 3 });
    expect(r.choice?.key).toBe('param:B');
    expect(r.range).toEqual({ min: 1, max: 4, scale: 'log' });
    expect(r.live).toEqual({ target: { kind: 'parameter', name: 'B' }, value: 3 });
    expect(resolveSweep(d, { key: 'param:A', liveValue: null }).value).toBe(1);
    const held = withLiveValue(d, { A: 5 }, r.live);
    expect(held.overrides).toEqual({ A: 5, B: 3 });
  });
});
