// A sampled loop run in time (continuous plant propagated exactly by mathjs expm between events,
// the controller by the reference executor) agrees at the sample instants with the closed loop
// computed from the pulse transfer function: two independent routes through the hold, the
// fractional dead time (modified z-transform) and the controller's difference equation.
import { describe, expect, it } from 'vitest';
import { expm, matrix } from 'mathjs';
import { poly, tfFromCoefficients } from '@loopwright/lti';
import { discretizeController } from './controller.ts';
import { discreteTransfer, filterSequence } from './discrete.ts';
import { createControllerState, stepController } from './executor.ts';
import { loopPulseTransfer } from './sampled-loop.ts';

/** ẋ = A x + B u for 1/(s(s + a)): x1 = y, x2 = ẏ (written out here, not from our realisation). */
function simulate(a: number, theta: number, T: number, steps: number, ctrl: ReturnType<typeof discretizeController>, r: number): number[] {
  const A = [
    [0, 1],
    [0, -a],
  ];
  const B = [0, 1];
  const prop = (x: number[], u: number, h: number) => {
    if (h <= 0) return x;
    const M = [
      [A[0][0] * h, A[0][1] * h, B[0] * h],
      [A[1][0] * h, A[1][1] * h, B[1] * h],
      [0, 0, 0],
    ];
    const E = expm(matrix(M)).toArray() as number[][];
    return [E[0][0] * x[0] + E[0][1] * x[1] + E[0][2] * u, E[1][0] * x[0] + E[1][1] * x[1] + E[1][2] * u];
  };
  const s = createControllerState(ctrl);
  const u: number[] = [];
  const y: number[] = [];
  let x = [0, 0];
  let t = 0;
  // The plant input at time t is u_j for t − θ in [jT, (j + 1)T); zero before the first output arrives.
  const inputAt = (tm: number) => {
    const j = Math.floor((tm - theta) / T + 1e-12);
    return j >= 0 && j < u.length ? u[j] : 0;
  };
  for (let k = 0; k < steps; k++) {
    const tk = k * T;
    // propagate to tk through the input switching instants jT + θ in (t, tk]
    const events: number[] = [];
    for (let j = 0; j <= k; j++) {
      const te = j * T + theta;
      if (te > t && te < tk) events.push(te);
    }
    for (const te of [...events, tk]) {
      x = prop(x, inputAt(0.5 * (t + te)), te - t);
      t = te;
    }
    y.push(x[0]);
    u.push(stepController(ctrl, s, r - x[0]));
  }
  return y;
}

describe('sampled loop in time against its pulse transfer function', () => {
  for (const [label, plantDelay, D] of [
    ['no delays', 0, 0],
    ['plant dead time 0.13 s and half a sample of computation', 0.13, 0.5],
    ['one whole sample of computation and a dead time of 1.7 samples', 0.34, 1],
  ] as const) {
    it(`${label}: y(kT) agree to 1e-10`, () => {
      const T = 0.2;
      const a = 1.5;
      const ctrl = discretizeController({ kind: 'pid', kp: 0.6, ti: 2.5, td: 0.3, n: 6 }, { sampleTime: T, computeDelay: D });
      const L = loopPulseTransfer({
        plant: tfFromCoefficients([1], [0, a, 1], plantDelay),
        sampleTime: T,
        computeDelay: D,
        controller: ctrl.transfer,
      });
      const closed = discreteTransfer(L.rational.num, poly.add(L.rational.den, L.rational.num), T);
      const steps = 150;
      const want = filterSequence(closed, new Array(steps).fill(1));
      const got = simulate(a, plantDelay + D * T, T, steps, ctrl, 1);
      got.forEach((v, k) => expect(Math.abs(v - want[k])).toBeLessThanOrEqual(1e-10));
      expect(Math.abs(got[steps - 1] - 1)).toBeLessThan(0.05); // integral action: y → r
    });
  }
});
