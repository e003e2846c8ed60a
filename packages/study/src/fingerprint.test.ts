/** The diagram fingerprint and the "all results in" rule. */
import { describe, expect, it, vi } from 'vitest';
import { resultsComplete } from './complete.ts';
import { diagramFingerprint, engineText, withTextMemo } from './fingerprint.ts';
import { unityLoop } from './testing.ts';

describe('diagram fingerprint', () => {
  it("writes a diagram's text once per object inside one request, and afresh in the next", () => {
    const a = unityLoop(2);
    const b = structuredClone(a);
    b.parameters[0].value = 3;
    const written = vi.spyOn(JSON, 'stringify');
    const [first, again, other, left] = withTextMemo(() => [
      engineText(a),
      engineText(a),
      engineText(b),
      engineText(a, a.parameters[0].name),
    ]);
    expect(written).toHaveBeenCalledTimes(3); // a once, b once, and the text without a parameter
    written.mockRestore();
    expect(again).toBe(first);
    expect(other).not.toBe(first);
    expect(left).toBe(engineText(a, a.parameters[0].name)); // `without` is never memoised
    // A change between two requests is seen by the next one.
    a.parameters[0].value = 3;
    expect(withTextMemo(() => engineText(a))).toBe(other);
    expect(withTextMemo(() => withTextMemo(() => engineText(a)))).toBe(engineText(b));
  });

  it('ignores layout, title and view; changes with anything the engine sees', () => {
    const a = unityLoop(2);
    const moved = structuredClone(a);
    moved.blocks[0].position = { x: 999, y: -5 };
    moved.title = 'renamed';
    moved.view = { theme: 'dark', zoom: 2 };
    expect(diagramFingerprint(moved)).toBe(diagramFingerprint(a));
    expect(diagramFingerprint(a)).toMatch(/^[0-9a-f]{14}$/);
    const changes: ((d: ReturnType<typeof unityLoop>) => void)[] = [
      (d) => (d.parameters[0].value = 3),
      (d) => (d.blocks[3].params.expression = '1/(s*(s + 3))'),
      (d) => (d.wires[4].to.port = 'in1'),
      (d) => (d.cuts[0].label = 'other'),
      (d) => (d.simulation = { end: 4 }),
    ];
    for (const change of changes) {
      const b = structuredClone(a);
      change(b);
      expect(diagramFingerprint(b)).not.toBe(diagramFingerprint(a));
    }
    // The analysis text leaves simulation settings and (on request) one parameter's value out.
    const sim = structuredClone(a);
    sim.simulation = { end: 4 };
    expect(engineText(sim)).toBe(engineText(a));
    const k = structuredClone(a);
    k.parameters[0].value = 7;
    expect(engineText(k, 'K')).toBe(engineText(a, 'K'));
  });
});

describe('all results in', () => {
  it('every part holds the generation it was last asked for', () => {
    expect(resultsComplete({ wanted: { a: 2, b: 1 }, held: { a: 2, b: 1 } })).toBe(true);
    expect(resultsComplete({ wanted: { a: 2, b: 3 }, held: { a: 2, b: 1 } })).toBe(false);
    expect(resultsComplete({ wanted: { a: 2, b: 3 }, held: { a: 2, b: 1 } }, ['a'])).toBe(true);
  });
});
