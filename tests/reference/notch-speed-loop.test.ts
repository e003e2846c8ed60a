import { describe, expect, it } from 'vitest';
import { cabs, cx, loopMargins, tevalComplex } from '@loopwright/lti';
import { closedLoopPoles, loopAtCut } from '@loopwright/graph';
import { diagramOf } from '@loopwright/graph/testing';

// A speed loop against a mechanical resonance, the notch filter's usual job (common practice, no
// source; the scenario is our own): a PI speed controller on an inertia J = 0.01 kg·m² whose
// load couples through a lightly damped mode, ωr = 1257 rad/s (200 Hz), ζr = 0.02:
//   G(s) = 1/(J·s) · ωr²/(s² + 2ζr·ωr·s + ωr²).
// At s = jωr the mode contributes 1/(2jζr) (a 25× peak): L(jωr) = −kp·(1 − j/(ti·ωr))/(2ζr·J·ωr),
// |L(jωr)| ≈ 3, with the phase near −180°, so the loop is unstable. A notch at 200 Hz with depth
// −30 dB multiplies L(jωr) by exactly 10^(−30/20) (its gain at ωn is ζz/ζp, see notch.test.ts) and
// restores the usual margins (GM ≥ 6 dB, PM ≥ 45°: common practice, no source).
const J = 0.01;
const WR = 1257;
const ZR = 0.02;
const KP = 1.5;
const TI = 0.027;

const speedLoop = (notch: boolean) =>
  diagramOf(
    [
      ['r', 'source'],
      ['e', 'summing-junction', { signs: '+-' }],
      ['c', 'pid', { form: 'ideal', kp: KP, ti: TI, td: 0 }],
      ['n', notch ? 'notch' : 'gain', notch ? { frequency: WR / (2 * Math.PI), frequencyUnit: 'Hz', depth: -30, damping: 0.5 } : { k: 1 }],
      ['g', 'transfer-function', { expression: `1/(${J}*s) * ${WR}^2/(s^2 + 2*${ZR}*${WR}*s + ${WR}^2)` }],
      ['y', 'probe'],
    ],
    ['r->e.in1', 'e->c', 'c->n', 'n->g', 'g->y', 'fb:g->e.in2'],
  );

describe('notch filter in a speed loop with a mechanical resonance', () => {
  const lAtResonance = (KP * Math.hypot(1, 1 / (TI * WR))) / (2 * ZR * J * WR);

  it('without it the resonance peak lifts |L| above 1 near −180°: unstable by margins and by the diagram poles', () => {
    const L = loopAtCut(speedLoop(false), 'fb');
    expect(Math.abs(cabs(tevalComplex(L, cx(0, WR))) / lAtResonance - 1)).toBeLessThan(1e-9);
    expect(lAtResonance).toBeGreaterThan(2.9);
    const m = loopMargins(L);
    expect(m.closedLoopStable).toBe(false);
    expect(closedLoopPoles(speedLoop(false)).some((p) => p.re > 0)).toBe(true);
  });

  it('with a −30 dB notch at ωr: |L(jωr)| drops by exactly 10^(−30/20); stable with GM ≥ 6 dB and PM ≥ 45°', () => {
    const L = loopAtCut(speedLoop(true), 'fb');
    expect(Math.abs(cabs(tevalComplex(L, cx(0, WR))) / (lAtResonance * 10 ** (-30 / 20)) - 1)).toBeLessThan(1e-9);
    const m = loopMargins(L);
    expect(m.closedLoopStable).toBe(true);
    expect(closedLoopPoles(speedLoop(true)).every((p) => p.re < 0)).toBe(true);
    expect(m.gainMarginDb!).toBeGreaterThan(6);
    expect(m.phaseMarginDeg!).toBeGreaterThan(45);
    // The crossover stays where the rigid body puts it, ≈ kp/J = 150 rad/s (PI and notch barely move it).
    expect(Math.abs(m.gainCrossover! / (KP / J) - 1)).toBeLessThan(0.05);
  });
});
