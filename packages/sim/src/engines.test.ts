import { demoDiagrams } from '@loopwright/graph';
import { describe, expect, it } from 'vitest';
import { compileModel, simulate, type SimResult } from './index.ts';
import { buildDiagram } from './test-support/build-diagram.ts';

/**
 * Every shipped demo on both engines: the exact engine (matrix exponentials, exact event
 * location) against odex run at a tight tolerance — two independent ways of moving the same
 * compiled model must give the same traces, events and actuator figures.
 */
function agree(exact: SimResult, odex: SimResult, until: number, tol: number): void {
  expect(exact.engine).toBe('exact');
  expect(odex.engine).toBe('odex');
  expect(exact.status, exact.message).toBe('ok');
  expect(odex.status, odex.message).toBe('ok');
  // compare at the output grid (times present in both: the grid is k·dt in both)
  const at = new Map(odex.time.map((t, i) => [t, i]));
  const common = exact.time.map((t, i) => [i, at.get(t)] as const).filter((p): p is readonly [number, number] => p[1] !== undefined);
  expect(common.length).toBeGreaterThan(0.9 * Math.min(exact.time.length, odex.time.length));
  for (const key of Object.keys(exact.traces)) {
    const a = exact.traces[key];
    const b = odex.traces[key];
    const range = Math.max(...b) - Math.min(...b) || 1;
    let worst = 0;
    for (const [i, j] of common) worst = Math.max(worst, Math.abs(a[i] - b[j]));
    expect(worst / range, key).toBeLessThanOrEqual(tol);
  }
  expect(exact.events.map((e) => `${e.kind} ${e.block}`)).toEqual(odex.events.map((e) => `${e.kind} ${e.block}`));
  exact.events.forEach((e, i) => expect(Math.abs(e.time - odex.events[i].time), e.kind).toBeLessThan(1e-7 * until));
  for (const [id, f] of Object.entries(exact.actuators)) {
    const g = odex.actuators[id];
    expect(f.limitHits, id).toBe(g.limitHits);
    expect(Math.abs(f.timeInSaturation - g.timeInSaturation), id).toBeLessThan(1e-7 * until);
    // odex samples its steps; the exact engine also locates the turning points between them, so its
    // peak is never below odex's (checked against a fine grid below)
    expect(f.peakEffort, id).toBeGreaterThanOrEqual(g.peakEffort - tol * Math.max(1, g.peakEffort));
  }
}

describe('the exact engine and odex agree on every shipped demo', () => {
  for (const demo of demoDiagrams) {
    const until = demo.diagram.simulation?.end ?? 10;
    for (const linear of [false, true]) {
      it(`${demo.id}${linear ? ' (linear overlay)' : ''}: traces within 1e-6 of their range, same events at the same times`, () => {
        const model = compileModel(demo.diagram);
        const exact = simulate(model, { until, linear, engine: 'exact' });
        const odex = simulate(model, { until, linear, engine: 'odex', rtol: 1e-9, atol: 1e-12, maxWallMs: 60000, maxSteps: 2e6 });
        agree(exact, odex, until, 1e-6);
      });
    }
  }

  it("heating cascade: the room controller's peak effort, located between steps, is the maximum of a fine-grid trace", () => {
    const demo = demoDiagrams.find((d) => d.id === 'heating-cascade')!;
    const model = compileModel(demo.diagram);
    const wires = ['w-supply-setpoint'];
    const exact = simulate(model, { until: 14400, wires, engine: 'exact' });
    // odex at a tight tolerance, sampled every 0.05 s (288 000 points): its largest sample
    const fine = simulate(model, {
      until: 14400,
      wires,
      engine: 'odex',
      rtol: 1e-10,
      atol: 1e-12,
      outputStep: 0.05,
      maxSteps: 5e6,
      maxWallMs: 120000,
    });
    const peak = fine.traces['wire:w-supply-setpoint'].reduce((m, v) => Math.max(m, Math.abs(v)), 0);
    const located = exact.actuators['room-controller'].peakEffort;
    expect(Math.abs(located - peak) / peak).toBeLessThan(1e-8);
    // and it lies between the exact engine's own samples: more than its largest sample
    const sampled = exact.traces['wire:w-supply-setpoint'].reduce((m, v) => Math.max(m, Math.abs(v)), 0);
    expect(located).toBeGreaterThan(sampled);
  });

  it('positioning axis over 10 s: the exact engine jumps over the quiescent tail and still agrees', () => {
    const demo = demoDiagrams.find((d) => d.id === 'positioning-axis')!;
    const model = compileModel(demo.diagram);
    const exact = simulate(model, { until: 10, engine: 'exact' });
    expect(exact.stats.exact!.jumps).toBeGreaterThanOrEqual(1);
    const odex = simulate(model, { until: 10, engine: 'odex', rtol: 1e-9, atol: 1e-12, maxWallMs: 60000, maxSteps: 2e6 });
    agree(exact, odex, 10, 1e-6);
  });
});

describe('which engine runs', () => {
  it('auto takes the exact engine; a dead time far shorter than the run, or a very large diagram, falls back to odex', () => {
    const lagWithDelay = (delay: number) =>
      buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1 }],
          ['d', 'dead-time', { delay }],
          ['g', 'first-order-lag', { k: 1, tau: 1 }],
          ['y', 'probe'],
        ],
        ['r -> d', 'd -> g', 'g -> y'],
      );
    expect(simulate(compileModel(lagWithDelay(0.1)), { until: 10 }).engine).toBe('exact');
    // steps no longer than 1 µs over 10 s would need 10⁷ steps: odex steps past the dead time instead
    const tiny = compileModel(lagWithDelay(1e-6));
    const res = simulate(tiny, { until: 10, rtol: 1e-9, atol: 1e-12 });
    expect(res.engine).toBe('odex');
    expect(res.status).toBe('ok');
    // first-order lag behind the dead time: 1 − e^(−(t − θ)) (standard closed form)
    expect(Math.abs(res.traces.y[res.traces.y.length - 1] - (1 - Math.exp(-(10 - 1e-6))))).toBeLessThan(1e-6);
    expect(() => simulate(tiny, { until: 10, engine: 'exact' })).toThrowError(
      /exact engine does not apply here: steps no longer than the shortest dead time/,
    );

    const blocks: Parameters<typeof buildDiagram>[0] = [['r', 'source', { shape: 'step', amplitude: 1 }]];
    const wires: string[] = [];
    for (let i = 0; i < 130; i++) {
      blocks.push([`l${i}`, 'first-order-lag', { k: 1, tau: 0.1 }]);
      wires.push(`${i === 0 ? 'r' : `l${i - 1}`} -> l${i}`);
    }
    blocks.push(['y', 'probe']);
    wires.push('l129 -> y');
    const big = compileModel(buildDiagram(blocks, wires));
    expect(simulate(big, { until: 1, outputStep: 0.1 }).engine).toBe('odex');
    expect(() => simulate(big, { until: 1, engine: 'exact' })).toThrowError(/131 states and inputs, above 119/);
    expect(() => simulate(big, { until: 1, engine: 'fast' as 'exact' })).toThrowError(/engine: "fast" is not one of auto, exact, odex/);
  });
});
