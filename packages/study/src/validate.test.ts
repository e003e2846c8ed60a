/**
 * One validation for every study (issue 10 item 4): each case `check` refuses is refused by
 * the locus, poles, cut, loops, closed-loop and run studies with the same message.
 */
import { describe, expect, it } from 'vitest';
import { checkDiagram, type Diagram } from '@loopwright/graph';
import { runStudy, type StudyRequest } from './study.ts';
import { build, unityLoop } from './testing.ts';
import { checkStudy, findingText, RefusedDiagram } from './validate.ts';

const studies: StudyRequest[] = [
  { kind: 'locus', target: { kind: 'parameter', name: 'K' } },
  { kind: 'poles' },
  { kind: 'cut', cut: null },
  { kind: 'loops' },
  { kind: 'closed-loop', from: { block: 'r' }, to: { block: 'y' } },
  { kind: 'run', until: 1 },
];

function refusedEverywhere(d: Diagram, code: string) {
  const errors = checkDiagram(d).filter((f) => f.severity === 'error');
  expect(errors.map((f) => f.code)).toContain(code);
  const first = findingText(errors[0]);
  for (const req of studies) {
    let caught: unknown = null;
    try {
      runStudy(d, req);
    } catch (e) {
      caught = e;
    }
    expect(caught, `${req.kind} computed on a diagram check refuses (${code})`).toBeInstanceOf(RefusedDiagram);
    expect((caught as Error).message.startsWith(first)).toBe(true);
    expect((caught as { inputError?: boolean }).inputError).toBe(true);
  }
}

describe('what check refuses, every study refuses with the same message', () => {
  it('a wire into an output port', () => {
    const d = unityLoop(2);
    d.wires.push({ id: 'bad', from: { block: 'r', port: 'out' }, to: { block: 'k', port: 'out' } });
    refusedEverywhere(d, 'wire-into-output');
  });
  it('two wires into one input', () => {
    const d = unityLoop(2);
    d.wires.push({ id: 'second', from: { block: 'r', port: 'out' }, to: { block: 'k', port: 'in' } });
    refusedEverywhere(d, 'multiple-drivers');
  });
  it('a parameter defined twice', () => {
    const d = unityLoop(2);
    d.parameters.push({ name: 'K', value: 7 });
    refusedEverywhere(d, 'duplicate-parameter');
  });
  it('an ill-posed algebraic self-loop (1 − loop gain at s → ∞ = 0)', () => {
    const d = build(
      [
        ['r', 'source'],
        ['e', 'summing-junction', { signs: '++' }],
        ['k', 'gain', { k: 'K' }],
        ['g', 'transfer-function', { expression: '1/(s + 1)' }],
        ['y', 'probe'],
      ],
      ['r->e.in1', 'e->k', 'k->g', 'g->y', 'self:k->e.in2'],
      [{ name: 'K', value: 1, min: 0.5, max: 2, scale: 'log' }],
    );
    refusedEverywhere(d, 'ill-posed-algebraic-loop');
  });
  it('a diagram with warnings only is analysed; the check lists them with counts', () => {
    const d = unityLoop(2);
    d.blocks.push({ id: 'idle', kind: 'gain', position: { x: 0, y: 300 }, params: { k: 1 } });
    const c = checkStudy(d);
    expect(c.counts.error).toBe(0);
    expect(c.counts.warning).toBeGreaterThan(0);
    expect(() => runStudy(d, { kind: 'loops' })).not.toThrow();
  });
});

describe('one verdict on an algebraic loop', () => {
  // A gain in a junction's own positive feedback (well posed: 1 − 0.5 ≠ 0) in front of a lag.
  const d = () =>
    build(
      [
        ['r', 'source'],
        ['e', 'summing-junction', { signs: '++' }],
        ['k', 'gain', { k: 0.5 }],
        ['g', 'transfer-function', { expression: '1/(s + 1)' }],
        ['y', 'probe'],
      ],
      ['r->e.in1', 'e->k', 'k->g', 'g->y', 'self:k->e.in2'],
    );

  it("the finding says the simulation cannot run it, in the simulator's words, and never that it is solved", () => {
    const f = checkStudy(d()).findings.find((x) => x.code === 'algebraic-loop')!;
    expect(f.severity).toBe('warning');
    expect(f.message).not.toMatch(/found by solving it/);
    expect(f.message).toMatch(/The linear analyses solve it, but the time simulation cannot run it: algebraic loop through blocks/);
    // …and the run refuses with the same words.
    let refusal = '';
    try {
      runStudy(d(), { kind: 'run', until: 1 });
    } catch (e) {
      refusal = (e as Error).message;
    }
    expect(refusal).toMatch(/^algebraic loop through blocks/);
    expect(f.message.endsWith(refusal)).toBe(true);
    // The analyses still run (the loop is well posed).
    expect(() => runStudy(d(), { kind: 'poles' })).not.toThrow();
  });
});
