import { describe, expect, it } from 'vitest';
import { checkAnalytic } from '../checks/analytic.ts';
import { checkDiagram } from '../checks/diagram.ts';
import { diagramOf } from './test-diagrams.ts';
import { hiddenModes } from './hidden-modes.ts';
import { compiledOf } from './reduce.ts';

/**
 * Internal stability: a controller zero at s = 1 cancels the unstable plant pole 1/(s − 1); the
 * loop r → y looks stable, the diagram is not (Skogestad & Postlethwaite, Sec. 4.7 (from
 * memory)). The diagram variants below must all be errors naming both blocks: nothing about
 * stability may depend on a probe, a fan-out or a junction that carries no dynamics.
 */
type Variant = 'plain' | 'probe on controller output' | 'fan-out to a second probe' | 'disturbance junction';
function cancelling(variant: Variant, controller = '(s-1)/(s+1)') {
  const blocks: Parameters<typeof diagramOf>[0] = [
    ['r', 'source'],
    ['e', 'summing-junction', { signs: '+-' }],
    ['C', 'transfer-function', { expression: controller }],
    ['P', 'transfer-function', { expression: '1/(s-1)' }],
    ['y', 'probe'],
  ];
  const wires = ['r->e.in1', 'e->C', 'fb:P->e.in2', 'P->y'];
  if (variant === 'disturbance junction') {
    blocks.push(['d', 'source'], ['j', 'summing-junction', { signs: '++' }]);
    wires.push('C->j.in1', 'd->j.in2', 'j->P');
  } else wires.push('C->P');
  if (variant === 'probe on controller output') {
    blocks.push(['u', 'probe']);
    wires.push('C->u');
  }
  if (variant === 'fan-out to a second probe') {
    blocks.push(['y2', 'probe']);
    wires.push('P->y2');
  }
  return diagramOf(blocks, wires);
}

describe('hidden modes by structure', () => {
  for (const variant of ['plain', 'probe on controller output', 'fan-out to a second probe', 'disturbance junction'] as Variant[]) {
    it(`a controller zero cancelling an unstable plant pole is an error (${variant})`, () => {
      const t0 = performance.now();
      const f = checkDiagram(cancelling(variant));
      const e = f.find((x) => x.code === 'unstable-cancellation');
      expect(e, JSON.stringify(f)).toBeDefined();
      expect(e!.severity).toBe('error');
      expect([...e!.blocks!].sort()).toEqual(['C', 'P']);
      expect(e!.message).toMatch(/pole 1 of block P/);
      expect(performance.now() - t0).toBeLessThan(5000); // per-test time limit (generous: shared machine)
    });
  }

  it('the hidden mode is found once, with its cancelling block', () => {
    const h = hiddenModes(compiledOf(cancelling('probe on controller output')));
    expect(h).toHaveLength(1);
    expect(h[0]).toMatchObject({ block: 'P', cancelledBy: ['C'], unstable: true });
    expect(h[0].pole.re).toBeCloseTo(1, 12);
  });

  it('a stable cancellation is information only; no cancellation, no finding', () => {
    const stable = checkAnalytic(
      diagramOf(
        [
          ['r', 'source'],
          ['e', 'summing-junction', { signs: '+-' }],
          ['C', 'transfer-function', { expression: '(s+2)/(s+5)' }],
          ['P', 'transfer-function', { expression: '1/(s+2)' }],
          ['y', 'probe'],
          ['u', 'probe'],
        ],
        ['r->e.in1', 'e->C', 'C->P', 'C->u', 'fb:P->e.in2', 'P->y'],
      ),
    );
    expect(stable.filter((x) => x.severity === 'error')).toEqual([]);
    expect(stable.some((x) => x.code === 'pole-zero-cancellation')).toBe(true);
    // A controller zero near but not at the pole moves it: the unstable plant is stabilised.
    const moved = hiddenModes(compiledOf(cancelling('probe on controller output', '3*(s+2)/(s+1)')));
    expect(moved).toEqual([]);
  });
});
