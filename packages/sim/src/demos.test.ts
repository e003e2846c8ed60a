import { demoDiagrams } from '@loopwright/graph';
import { describe, expect, it } from 'vitest';
import { compileModel, simulate } from './index.ts';

describe('demo diagrams simulate within budget', () => {
  for (const demo of demoDiagrams) {
    it(`${demo.id}: nonlinear run and its linear overlay complete`, () => {
      const model = compileModel(demo.diagram);
      const until = demo.diagram.simulation?.end ?? 10;
      const res = simulate(model, { until, maxWallMs: 5000 });
      expect(res.status, res.message).toBe('ok');
      expect(res.timeReached).toBe(until);
      const probes = demo.diagram.blocks.filter((b) => b.kind === 'probe').map((b) => b.id);
      expect(Object.keys(res.traces).sort()).toEqual([...probes].sort());
      for (const id of probes) expect(res.traces[id].every(Number.isFinite)).toBe(true);
      const lin = simulate(model, { until, linear: true, maxWallMs: 5000 });
      expect(lin.status, lin.message).toBe('ok');
      expect(lin.events.length).toBe(0);
    });
  }
});
