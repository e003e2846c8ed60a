// tune: a published rule with its predicted margins, and the Ms-constrained tuner, on 2e^(−s)/(10s + 1).
// Figures: tune.simc.median, tune.ms-pi.median, tune.ms-pid.median, tune.ms-pid-over-pi.ratio.
import { bench, ratio, report, section } from './harness.ts';
import { robustTune, simcRule } from '@loopwright/tune';
import { tfFromCoefficients } from '@loopwright/lti';

export function run(): void {
  section('tune: 2e^(−s)/(10s + 1)');
  const plant = tfFromCoefficients([2], [1, 10], 1);
  report(
    bench('SIMC PI with predicted margins', () => simcRule({ kind: 'fopdt', gain: 2, timeConstants: [10], deadTime: 1 }), { minRuns: 10 }),
    undefined,
    'simc',
  );
  const pi = bench('Ms ≤ 1.4 PI (grid, golden section, exact check)', () => robustTune(plant), { minRuns: 5, minMs: 1000, warmup: 1 });
  report(pi, undefined, 'ms-pi');
  const pid = bench('Ms ≤ 1.4 PID (kp, td search)', () => robustTune(plant, { controller: 'pid' }), { minRuns: 3, minMs: 1000, warmup: 1 });
  report(pid, undefined, 'ms-pid');
  ratio('Ms PID / Ms PI', pid, pi, undefined, 'ms-pid-over-pi');
}
