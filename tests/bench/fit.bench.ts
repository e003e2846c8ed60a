// fit: reading a test log and least-squares fits on the demo bump test (1801 samples).
// Figures: fit.csv.median, fit.fopdt.median, fit.sopdt.median, fit.ipdt.median, fit.sopdt-over-fopdt.ratio.
import { bench, ratio, report, section } from './harness.ts';
import { demoTestLogs, fitProcessModel, parseTestLogCsv } from '@loopwright/fit';

export function run(): void {
  section('fit: the demo bump test (1801 samples)');
  const text = demoTestLogs[0].csv();
  report(
    bench('parse CSV (d3-dsv, checks, SHA-256)', () => parseTestLogCsv(text), { minRuns: 10 }),
    undefined,
    'csv',
  );
  const log = parseTestLogCsv(text);
  const fo = bench('fit FOPDT (two-point and grid starts, LM)', () => fitProcessModel(log, { model: 'fopdt' }), {
    minRuns: 5,
    minMs: 1000,
    warmup: 1,
  });
  report(fo, undefined, 'fopdt');
  const so = bench('fit SOPDT (FOPDT fit first, four starts, LM)', () => fitProcessModel(log, { model: 'sopdt' }), {
    minRuns: 5,
    minMs: 1000,
    warmup: 1,
  });
  report(so, undefined, 'sopdt');
  report(
    bench('fit IPDT', () => fitProcessModel(log, { model: 'ipdt' }), { minRuns: 5, minMs: 500, warmup: 1 }),
    undefined,
    'ipdt',
  );
  ratio('SOPDT / FOPDT fit', so, fo, undefined, 'sopdt-over-fopdt');
}
