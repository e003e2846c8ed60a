import { describe, expect, it } from 'vitest';
import { compileModel, simulate } from './index.ts';
import { buildDiagram } from './test-support/build-diagram.ts';

/**
 * A loop of a gain and a dead time has no state for the engines to watch: with loop gain 2 its
 * signal doubles in sign-alternating steps every dead time, 1, −2, 6, −10, … (the difference
 * equation y(t) = 2 − 2·y(t − τ) for a unit step, derived here), overflows and becomes NaN. The
 * run must end as diverged with finite traces, never report ok over NaN (found by the document fuzzer).
 */
describe('divergence through dead-time histories', () => {
  it('r → e(+−) → 2·e^(−1e-9·s) → y with unity feedback ends as diverged, every recorded value finite', () => {
    const d = buildDiagram(
      [
        ['r', 'source', { shape: 'step', amplitude: 1 }],
        ['e', 'summing-junction', { signs: '+-' }],
        ['g', 'transfer-function', { expression: '2*exp(-1e-9*s)' }],
        ['y', 'probe'],
      ],
      ['r -> e.in1', 'e -> g', 'g -> e.in2', 'g -> y'],
    );
    const res = simulate(compileModel(d), { until: 10 });
    expect(res.status).toBe('diverged');
    expect(res.message).toMatch(/a signal is no longer finite/);
    expect(res.timeReached).toBeLessThan(1e-5);
    for (const col of Object.values(res.traces)) for (const v of col) expect(Number.isFinite(v)).toBe(true);
    // The first values follow y(t) = 2 − 2·y(t − τ): 0 before the first delay, then 2, −2, 6, −10.
    expect(res.traces.y.slice(0, 5)).toEqual([0, 2, -2, 6, -10].map((v, i) => expect.closeTo(v, i < 3 ? 12 : 9)));
  });
});
