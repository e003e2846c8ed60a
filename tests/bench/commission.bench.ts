// commission: the studies behind `loopwright fit` / `loopwright tune` and the editor's Test log and
// Tune views — the demo bump test fitted with the three models, a cut's tuning with and without
// its step responses, the Ms tuner on the room loop, the cascade workflow.
// Figures: commission.fit-3.median, commission.tune-simc.median, commission.tune-simc-responses.median,
// commission.responses-over-tune.ratio, commission.tune-ms-room.median, commission.cascade.median.
import { bench, ratio, report, section } from './harness.ts';
import { emptyDiagram, heatingCascade } from '@loopwright/graph';
import { supplyValveBumpCsv } from '@loopwright/fit';
import { clearCaches, runStudy } from '@loopwright/study';

export function run(): void {
  section('commission: fit and tune studies (demo bump test, heating cascade)');
  const csv = supplyValveBumpCsv();
  report(
    bench(
      'fit: 1801 samples, FOPDT + SOPDT + IPDT with intervals',
      () => runStudy(emptyDiagram(), { kind: 'fit', csv, fittedAt: '2026-01-01T00:00:00Z' }),
      { minRuns: 3, minMs: 1000, warmup: 1 },
    ),
    undefined,
    'fit-3',
  );
  const plain = bench(
    'tune: supply loop, SIMC PI, inner-first',
    () => {
      clearCaches();
      return runStudy(heatingCascade, { kind: 'tune', rule: 'simc', cut: 'cut-supply', responses: false });
    },
    { minRuns: 5, minMs: 1000, warmup: 1 },
  );
  report(plain, undefined, 'tune-simc');
  const full = bench(
    'tune: the same with set-point and load responses (before/after, dead time exact)',
    () => {
      clearCaches();
      return runStudy(heatingCascade, { kind: 'tune', rule: 'simc', cut: 'cut-supply' });
    },
    { minRuns: 5, minMs: 1000, warmup: 1 },
  );
  report(full, undefined, 'tune-simc-responses');
  ratio('with responses / without', full, plain, undefined, 'responses-over-tune');
  report(
    bench(
      'tune: room loop, Ms ≤ 1.4 PI (supply loop closed)',
      () => runStudy(heatingCascade, { kind: 'tune', rule: 'ms', cut: 'cut-room', responses: false }),
      { minRuns: 3, minMs: 1000, warmup: 1 },
    ),
    undefined,
    'tune-ms-room',
  );
  report(
    bench('cascade: supply then room, SIMC PI, separation', () => runStudy(heatingCascade, { kind: 'cascade', rule: 'simc' }), {
      minRuns: 3,
      minMs: 1000,
      warmup: 1,
    }),
    undefined,
    'cascade',
  );
}
