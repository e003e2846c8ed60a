import { describe, expect, it } from 'vitest';
import { loopMargins, poly, tfFromCoefficients, tmul } from '@loopwright/lti';
import { controllerSetting, controllerTransfer } from './controller.ts';
import { robustTune } from './robust.ts';

const plant = tfFromCoefficients([2], [1, 10], 1); // 2e^(−s)/(10s + 1)

/** An InputError naming the field. */
const fieldError = (field: string) => expect.objectContaining({ inputError: true, details: expect.objectContaining({ field }) });

describe('robustTune: largest integral gain with Ms ≤ target', () => {
  const pi = robustTune(plant);

  it('meets Ms ≤ 1.4 on the exact frequency response, with the bound active', () => {
    const m = loopMargins(tmul(controllerTransfer(pi.controller), plant));
    expect(m.closedLoopStable).toBe(true);
    expect(m.peakSensitivity!).toBeLessThanOrEqual(1.4 * (1 + 1e-9));
    expect(m.peakSensitivity!).toBeGreaterThan(1.4 - 1e-3);
    // The prediction is lti's loopMargins of the same loop.
    expect(pi.predicted!.ms).toBe(m.peakSensitivity);
    expect(pi.predicted!.phaseMarginDeg).toBe(m.phaseMarginDeg);
    expect(pi.settings.integralGain).toBeCloseTo(pi.controller.kp / pi.controller.ti!, 12);
  });

  it('satisfies the margin bounds every loop with that Ms has: GM ≥ Ms/(Ms − 1), PM ≥ 2·asin(1/(2Ms))', () => {
    // Skogestad & Postlethwaite, Sec. 2.4.3, Eqs. (2.40)–(2.41) (from memory) [R26]: Ms = 1.4 → GM ≥ 3.5, PM ≥ 41.85°
    expect(pi.predicted!.gainMargin!).toBeGreaterThanOrEqual(3.5);
    expect(pi.predicted!.phaseMarginDeg!).toBeGreaterThanOrEqual(41.85);
  });

  it('is the largest: 1 % more integral gain breaks Ms ≤ 1.4 for every kp tried (checked by loopMargins)', () => {
    const ki = 1.01 * (pi.controller.kp / pi.controller.ti!);
    for (let i = 1; i <= 24; i++) {
      const kp = (pi.controller.kp * 2.5 * i) / 24;
      const m = loopMargins(tmul(controllerTransfer(controllerSetting('pi', kp, kp / ki)), plant));
      expect(!m.closedLoopStable || m.peakSensitivity! > 1.4).toBe(true);
    }
  });

  it('honours phase- and gain-margin floors', () => {
    const a = robustTune(plant, { pmMinDeg: 65 });
    expect(a.predicted!.phaseMarginDeg!).toBeGreaterThanOrEqual(65 - 1e-6);
    expect(a.predicted!.ms!).toBeLessThanOrEqual(1.4 * (1 + 1e-9));
    expect(a.settings.integralGain).toBeLessThan(pi.settings.integralGain);
    const b = robustTune(plant, { gmMin: 6 });
    expect(b.predicted!.gainMargin!).toBeGreaterThanOrEqual(6 * (1 - 1e-6));
  });

  it('PID: Ms ≤ 1.4, ti ≥ 4·td, and more integral gain than PI', () => {
    const pid = robustTune(plant, { controller: 'pid' });
    expect(pid.controller.kind).toBe('pid');
    expect(pid.controller.td).toBeGreaterThan(0);
    expect(pid.controller.ti!).toBeGreaterThanOrEqual(4 * pid.controller.td * (1 - 1e-9));
    expect(pid.predicted!.ms!).toBeLessThanOrEqual(1.4 * (1 + 1e-9));
    expect(pid.settings.integralGain).toBeGreaterThan(pi.settings.integralGain);
    // The prediction uses the block's derivative filter td/n, n = 10.
    const m = loopMargins(tmul(controllerTransfer(pid.controller, 10), plant));
    expect(pid.predicted!.ms).toBe(m.peakSensitivity);
  });

  it('a plant of negative gain gets reverse action with the same magnitudes', () => {
    const neg = robustTune(tfFromCoefficients([-2], [1, 10], 1));
    expect(neg.controller.kp).toBeCloseTo(-pi.controller.kp, 9);
    expect(neg.controller.ti).toBeCloseTo(pi.controller.ti!, 9);
    expect(neg.predicted!.closedLoopStable).toBe(true);
    expect(neg.predicted!.ms).toBeCloseTo(pi.predicted!.ms!, 6);
  });

  it('tunes an integrating process with dead time and a higher-order lag', () => {
    const s = robustTune(tfFromCoefficients([0.5], poly.mul([0, 1], [1, 2]), 0.5), { msMax: 1.6 });
    expect(s.predicted!.closedLoopStable).toBe(true);
    expect(s.predicted!.ms!).toBeLessThanOrEqual(1.6 * (1 + 1e-9));
    expect(s.predicted!.ms!).toBeGreaterThan(1.6 - 2e-3);
  });

  it('rejects plants it cannot start from and bad targets', () => {
    expect(() => robustTune(tfFromCoefficients([1], [-1, 1]))).toThrow(fieldError('plant'));
    expect(() => robustTune(tfFromCoefficients([1], [1, 0, 1]))).toThrow(fieldError('plant'));
    expect(() => robustTune(plant, { msMax: 1 })).toThrow(fieldError('msMax'));
    expect(() => robustTune(plant, { pmMinDeg: 95 })).toThrow(fieldError('pmMinDeg'));
    expect(() => robustTune(plant, { gmMin: 0.5 })).toThrow(fieldError('gmMin'));
  });

  it('says why a first-order lag without dead time has no answer: PI·K/(τs + 1) never nears −1, so Ms bounds no integral gain', () => {
    expect(() => robustTune(tfFromCoefficients([0.8], [1, 0.0025]))).toThrow(/integral gain can grow without limit/);
  });
});
