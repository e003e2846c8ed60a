// Published tuning rules applied through @loopwright/tune, with the predicted margins of the
// tuned loops (lti loopMargins, dead time exact): reference rows R34–R37, R49, R51–R53.
import { describe, expect, it } from 'vitest';
import { loopMargins, poly, tfFromCoefficients, tmul } from '@loopwright/lti';
import { fopdt, halfRuleOf, ipdt } from '@loopwright/fit';
import {
  amigoRule,
  controllerTransfer,
  lambdaRule,
  simcRule,
  suggestTuning,
  ultimatePoint,
  zieglerNicholsStepRule,
  zieglerNicholsUltimateRule,
} from '@loopwright/tune';

const near = (got: number | null | undefined, want: number, tol: number) => {
  expect(got).not.toBeNull();
  expect(Math.abs((got as number) - want)).toBeLessThanOrEqual(tol);
};

describe('R36: SIMC PI on first order plus dead time, τc = θ', () => {
  it('(a) k = 2, τ1 = 10, θ = 1: Kc = 2.5, τI = 8; GM = 3.106, PM = 58.35°, Ms = 1.609', () => {
    // SIMC PI rule (Skogestad 2003, rule as restated on the author's page); margins derived here [R36]
    const s = simcRule(fopdt(2, 10, 1));
    near(s.controller.kp, 2.5, 1e-12);
    near(s.controller.ti, 8, 1e-12);
    expect(s.controller.td).toBe(0);
    expect(s.settings.tauC).toBe(1);
    near(s.predicted!.gainMargin, 3.106, 1e-3);
    near(s.predicted!.phaseMarginDeg, 58.35, 0.01);
    near(s.predicted!.ms, 1.609, 1e-3);
  });

  it('(b) k = 0.5, τ1 = 3, θ = 1: Kc = 3, τI = 3; the loop is e^(−s)/(2s): GM = π, PM = 90° − 1/2 rad', () => {
    // [R36]; with τI = τ1 the loop is e^(−θs)/((τc + θ)s), that of R24
    const s = simcRule(fopdt(0.5, 3, 1));
    near(s.controller.kp, 3, 1e-12);
    near(s.controller.ti, 3, 1e-12);
    near(s.predicted!.gainMargin, Math.PI, 1e-4);
    near(s.predicted!.phaseMarginDeg, 61.35, 0.01);
    near(s.predicted!.phaseMarginDeg, 90 - (0.5 * 180) / Math.PI, 1e-6);
  });
});

describe('R37: SIMC PI on an integrating process k′e^(−θs)/s, k′ = 1, θ = 1, τc = θ', () => {
  it('Kc = 0.5, τI = 8; GM = 2.963, PM = 46.86°, Ms = 1.7035, ωgc = 0.5145, DM = 1.590 s', () => {
    // SIMC integrating-process rule and its robustness figures (from memory); ωgc, DM derived here [R37]
    const s = simcRule(ipdt(1, 1));
    near(s.controller.kp, 0.5, 1e-12);
    near(s.controller.ti, 8, 1e-12);
    near(s.predicted!.gainMargin, 2.963, 1e-3);
    near(s.predicted!.phaseMarginDeg, 46.86, 0.01);
    near(s.predicted!.ms, 1.7035, 1e-4);
    near(s.predicted!.margins.gainCrossover, 0.5145, 1e-4);
    near(s.predicted!.delayMargin, 1.59, 1e-3);
    // The paper's rounded figures: GM 2.96, PM 46.9°, Ms 1.70.
    near(s.predicted!.gainMargin, 2.96, 0.01);
    near(s.predicted!.phaseMarginDeg, 46.9, 0.1);
    near(s.predicted!.ms, 1.7, 0.01);
  });
});

describe('R49: SIMC PI on the half-rule model of 1/((s + 1)(0.2s + 1))', () => {
  it('model k = 1, τ1 = 1.1, θ = 0.1; Kc = 5.5, τI = min(1.1, 8θ) = 0.8', () => {
    // SIMC half rule and PI rule (Skogestad 2003); settings derived here [R49]
    const plant = tfFromCoefficients([1], poly.mul([1, 1], [1, 0.2]));
    const s = simcRule(halfRuleOf(plant, 'fopdt').model);
    near(s.controller.kp, 5.5, 1e-9);
    near(s.controller.ti, 0.8, 1e-9);
    // The same through the entry point, which reads the model off the loop.
    const t = suggestTuning({ rule: 'simc', plant });
    near(t.controller.kp, 5.5, 1e-9);
    near(t.controller.ti, 0.8, 1e-9);
    expect(t.reduction).not.toBeNull();
    // Predicted on the real loop (second-order plant), not only on the reduced model.
    const m = loopMargins(tmul(controllerTransfer(t.controller), plant));
    near(t.predicted!.ms, m.peakSensitivity!, 1e-12);
  });
});

describe('R51: AMIGO on K = 2, T = 10, L = 1', () => {
  // Åström & Hägglund (2004) and Advanced PID Control (2006), ch. 7 (formulas from memory); loop measures derived here [R51]
  it('PI: K·Kp = 2.82355, Kp = 1.41178, Ti = 6.0769 (= 0.35 + 1300/227); loop GM = 5.395, PM = 62.33°, Ms = 1.317, ωgc = 0.3049', () => {
    const s = amigoRule(fopdt(2, 10, 1));
    near(2 * s.controller.kp, 2.82355, 1e-5);
    near(s.controller.kp, 1.41178, 1e-5);
    near(s.controller.ti, 0.35 + 1300 / 227, 1e-12);
    near(s.controller.ti, 6.0769, 1e-4);
    near(s.predicted!.gainMargin, 5.395, 1e-3);
    near(s.predicted!.phaseMarginDeg, 62.33, 0.01);
    near(s.predicted!.ms, 1.317, 1e-3);
    near(s.predicted!.margins.gainCrossover, 0.3049, 1e-4);
  });
  it('PID: K·Kp = 4.7, Kp = 2.35, Ti = 4.2, Td = 0.48544', () => {
    const s = amigoRule(fopdt(2, 10, 1), { controller: 'pid' });
    near(s.controller.kp, 2.35, 1e-5);
    near(s.controller.ti, 4.2, 1e-4);
    near(s.controller.td, 0.48544, 1e-5);
  });
  it('the integrating-process forms are the T → ∞ limits of the FOPDT formulas (K/T = k′ fixed)', () => {
    // identity of the published formulas (the integrating forms round 13.35L to 13.4L)
    const kv = 0.3;
    const L = 2;
    const T = 1e7;
    const big = amigoRule(fopdt(kv * T, T, L));
    const integ = amigoRule(ipdt(kv, L));
    near(big.controller.kp / integ.controller.kp, 1, 1e-5);
    near(big.controller.ti! / L, 13.35, 1e-4);
    near(integ.controller.ti! / L, 13.4, 1e-12);
    const bigD = amigoRule(fopdt(kv * T, T, L), { controller: 'pid' });
    const integD = amigoRule(ipdt(kv, L), { controller: 'pid' });
    near(bigD.controller.kp / integD.controller.kp, 1, 1e-5);
    near(bigD.controller.ti! / integD.controller.ti!, 1, 1e-5);
    near(bigD.controller.td / integD.controller.td, 1, 1e-5);
  });
});

describe('R52: lambda (IMC) PI on K = 2, T = 10, L = 1', () => {
  // lambda tuning as presented in Åström & Hägglund (2006), ch. 6 (from memory); Rivera, Morari & Skogestad (1986) (from memory) [R52]
  it('λ = 2: Kc = 1.66667, Ti = 10; loop e^(−s)/(3s): ωgc = 1/3, PM = 90° − (1/3 rad), GM = 3π/2, Ms = 1.3486', () => {
    const s = lambdaRule(fopdt(2, 10, 1), { lambda: 2 });
    near(s.controller.kp, 1.66667, 1e-5);
    near(s.controller.ti, 10, 1e-12);
    near(s.predicted!.margins.gainCrossover, 1 / 3, 1e-9);
    near(s.predicted!.phaseMarginDeg, 70.9, 0.01);
    near(s.predicted!.gainMargin, (3 * Math.PI) / 2, 1e-4);
    near(s.predicted!.margins.gainMarginDb, 13.465, 1e-3);
    near(s.predicted!.ms, 1.3486, 1e-4);
  });
  it('λ = L: Kc = 2.5 (the loop of R24)', () => {
    near(lambdaRule(fopdt(2, 10, 1), { lambda: 1 }).controller.kp, 2.5, 1e-12);
  });
});

describe('R53: Ziegler–Nichols step-response rules on K = 2, T = 10, L = 1 (a = KL/T = 0.2)', () => {
  // Ziegler & Nichols (1942) (from memory); table with Ti = 3L as in Åström & Hägglund (1995) (from memory) [R53]
  const m = fopdt(2, 10, 1);
  it('P: Kp = 5; PI: Kp = 4.5, Ti = 3; PID: Kp = 6, Ti = 2, Td = 0.5', () => {
    const p = zieglerNicholsStepRule(m, { controller: 'p' });
    near(p.settings.a, 0.2, 1e-12);
    near(p.controller.kp, 5, 1e-9);
    expect(p.controller.ti).toBeNull();
    const pi = zieglerNicholsStepRule(m);
    near(pi.controller.kp, 4.5, 1e-9);
    near(pi.controller.ti, 3, 1e-9);
    const pid = zieglerNicholsStepRule(m, { controller: 'pid' });
    near(pid.controller.kp, 6, 1e-9);
    near(pid.controller.ti, 2, 1e-9);
    near(pid.controller.td, 0.5, 1e-9);
  });
  it('PI loop: ωgc = √0.9 (100ω⁴ − 80ω² − 9 = 0), PM = 22.30°, GM = 1.528, Ms = 3.635', () => {
    const s = zieglerNicholsStepRule(m);
    near(s.predicted!.margins.gainCrossover, Math.sqrt(0.9), 1e-9);
    near(s.predicted!.margins.gainCrossover, 0.94868, 1e-5);
    near(s.predicted!.phaseMarginDeg, 22.3, 0.01);
    near(s.predicted!.gainMargin, 1.528, 1e-3);
    near(s.predicted!.ms, 3.635, 1e-3);
  });
});

describe('R34, R35: Ziegler–Nichols ultimate-gain rules, Ku and Pu from the exact phase crossover', () => {
  it('R34: 1/(s(s + 2)(s + 4)): Ku = 48, ωu = 2√2, Pu = 2.2214; P 24; PI 21.6, 1.8512; PID 28.8, 1.1107, 0.27768', () => {
    // Ziegler & Nichols (1942) (from memory); Ogata, Sec. 8-2, Table 8-2 [R34]
    const plant = tfFromCoefficients([1], poly.fromDescending([1, 6, 8, 0]));
    const u = ultimatePoint(plant)!;
    near(u.ku, 48, 1e-6);
    near(u.omega, 2 * Math.SQRT2, 1e-9);
    near(u.pu, 2.2214, 1e-4);
    near(zieglerNicholsUltimateRule(u, { controller: 'p' }).controller.kp, 24, 1e-4);
    const pi = zieglerNicholsUltimateRule(u, { controller: 'pi' });
    near(pi.controller.kp, 21.6, 1e-4);
    near(pi.controller.ti, 1.8512, 1e-4);
    const pid = zieglerNicholsUltimateRule(u, { controller: 'pid', plant });
    near(pid.controller.kp, 28.8, 1e-4);
    near(pid.controller.ti, 1.1107, 1e-4);
    near(pid.controller.td, 0.27768, 1e-5);
    expect(pid.predicted?.closedLoopStable).toBe(true);
    expect(pi.predicted).toBeNull(); // no loop given: nothing to predict on
  });
  it('R35: 1/(s(s + 1)(s + 5)): Kcr = 30, Pcr = 2.8099; Kp = 18, Ti = 1.4050, Td = 0.35124', () => {
    // Ogata, Sec. 8-2, Example 8-1 [R35]
    const s = suggestTuning({ rule: 'zn-ultimate', plant: tfFromCoefficients([1], poly.fromDescending([1, 6, 5, 0])), controller: 'pid' });
    near(s.settings.ku, 30, 1e-4);
    near(s.settings.pu, 2.8099, 1e-4);
    near(s.controller.kp, 18, 1e-4);
    near(s.controller.ti, 1.405, 1e-4);
    near(s.controller.td, 0.35124, 1e-5);
  });
});
