// Controllers of every kind, method and anti-windup mode, each with a retuned variant: the
// cases the generated-code checks run (Structured Text here, C in tests/unit).
import { tfFromCoefficients } from '@loopwright/lti';
import { type DiscreteController, discretizeController } from '../controller.ts';

export const CASES: { label: string; make: () => DiscreteController; retune: () => DiscreteController }[] = [];
for (const integral of ['backward', 'forward', 'tustin'] as const) {
  for (const antiWindup of ['off', 'back-calculation', 'conditional'] as const) {
    const spec = { kind: 'pid' as const, kp: 1.8, ti: 0.6, td: 0.12, n: 9, umin: -1.5, umax: 2, antiWindup };
    CASES.push({
      label: `PID ${integral} ${antiWindup}`,
      make: () => discretizeController(spec, { sampleTime: 0.01, integral }),
      retune: () => discretizeController({ ...spec, kp: 2.6, ti: 0.45 }, { sampleTime: 0.01, integral }),
    });
  }
}
CASES.push({
  label: 'PID with Tustin derivative, no limits',
  make: () => discretizeController({ kind: 'pid', kp: 0.9, ti: 1.2, td: 0.3 }, { sampleTime: 0.02, derivative: 'tustin' }),
  retune: () => discretizeController({ kind: 'pid', kp: 1.1, ti: 1.2, td: 0.3 }, { sampleTime: 0.02, derivative: 'tustin' }),
});
for (const antiWindup of ['off', 'limited-feedback'] as const) {
  const tf = (k: number) => ({
    kind: 'transfer-function' as const,
    tf: tfFromCoefficients([k, 3 * k, 0.4 * k], [0, 1, 0.05]),
    umin: -2,
    umax: 2.5,
    antiWindup,
  });
  CASES.push({
    label: `transfer function (PID-like, order 2) ${antiWindup}`,
    make: () => discretizeController(tf(1.5), { sampleTime: 0.01 }),
    retune: () => discretizeController(tf(2.2), { sampleTime: 0.01 }),
  });
}
CASES.push({
  label: 'lead–lag, zero-order-hold equivalent, upper limit only',
  make: () => discretizeController({ kind: 'lead-lag', k: 4, tLead: 0.3, tLag: 0.03, umax: 3 }, { sampleTime: 0.005, method: 'zoh' }),
  retune: () => discretizeController({ kind: 'lead-lag', k: 5, tLead: 0.25, tLag: 0.03, umax: 3 }, { sampleTime: 0.005, method: 'zoh' }),
});
CASES.push({
  label: 'gain',
  make: () => discretizeController({ kind: 'gain', k: 2.5, umin: -1, umax: 1 }, { sampleTime: 0.1 }),
  retune: () => discretizeController({ kind: 'gain', k: 0.5, umin: -1, umax: 1 }, { sampleTime: 0.1 }),
});

CASES.push({
  label: 'notch filter with a lag (order 3), Tustin prewarped at the notch, limits',
  make: () =>
    discretizeController(
      { kind: 'transfer-function', tf: tfFromCoefficients([100, 0.4, 1], [100, 9, 8.08, 0.01]), umin: -0.8, umax: 0.8 },
      { sampleTime: 0.01, prewarp: 10 },
    ),
  retune: () =>
    discretizeController(
      { kind: 'transfer-function', tf: tfFromCoefficients([121, 0.44, 1], [121, 10.21, 8.1, 0.01]), umin: -0.8, umax: 0.8 },
      { sampleTime: 0.01, prewarp: 11 },
    ),
});
