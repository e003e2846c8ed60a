// sampled: hold equivalents, sampled-loop margins, z-plane locus, delay margin and code generation.
import { bench, ratio, report, section } from './harness.ts';
import { loopMargins, poly, tfFromCoefficients, tmul } from '@loopwright/lti';
import {
  discretizeController,
  exportController,
  holdEquivalent,
  makeTestVector,
  exerciseInput,
  sampledDelayMargin,
  sampledLocus,
  sampledMargins,
} from '@loopwright/sampled';

export function run(): void {
  section('sampled: discretisation, sampled-loop analysis, code');
  // A speed loop of our own: a drive's mechanics 1/(J·s + B) behind a current loop taken as a
  // first-order lag of 0.4 ms and a 0.15 ms dead time (encoder filter), PI at T = 0.25 ms with one
  // sample of computation delay.
  const plant = tfFromCoefficients([50], poly.mul([0.2, 1], [1, 4e-4]), 1.5e-4);
  const T = 2.5e-4;
  const pi = discretizeController({ kind: 'pid', kp: 0.9, ti: 0.012, umin: -10, umax: 10 }, { sampleTime: T, computeDelay: 1 });
  const continuousPi = tfFromCoefficients([0.9 / 0.012, 0.9], [0, 1]);

  const zoh = bench('sampled.zoh (2nd order, fractional dead time)', () => holdEquivalent(plant, T, { computeDelay: 1 }), {
    minRuns: 200,
    minMs: 300,
  });
  report(zoh);
  const loop = { plant, sampleTime: T, computeDelay: 1, controller: pi.transfer, continuousController: continuousPi };
  const sm = bench('sampled.margins (unit circle + continuous + estimate)', () => sampledMargins(loop), { minRuns: 20, minMs: 500 });
  report(sm, 50);
  const cont = bench('sampled.margins.continuousOnly (lti loopMargins)', () => loopMargins(tmul(continuousPi, plant)), {
    minRuns: 20,
    minMs: 300,
  });
  report(cont);
  ratio('sampled margins / continuous margins', sm, cont);
  const loc = bench(
    'sampled.locus (z-plane, unit-circle crossings)',
    () => sampledLocus({ plant, sampleTime: T, computeDelay: 1, controller: pi.transfer }),
    { minRuns: 10, minMs: 500 },
  );
  report(loc, 100);
  const dm = bench('sampled.delayMargin (exact: scan + bisection)', () => sampledDelayMargin(loop), { minRuns: 5, minMs: 500, warmup: 1 });
  report(dm);
  const vec = exerciseInput(2000, 5);
  const code = bench('sampled.export (C + ST + 2000-sample test vector)', () => {
    exportController(pi, 'c', 'speed_pi');
    exportController(pi, 'st', 'speed_pi');
    makeTestVector(pi, vec);
  });
  report(code);
}
