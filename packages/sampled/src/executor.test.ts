import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { tfFromCoefficients } from '@loopwright/lti';
import { type DiscreteLinear, type DiscretePid, discretizeController, linearController } from './controller.ts';
import { filterSequence } from './discrete.ts';
import { createControllerState, retuneController, runController, stepController, withCoefficients } from './executor.ts';
import { exerciseInput, makeTestVector, testVectorFromJson, testVectorMismatch, testVectorToJson } from './test-vector.ts';

const pid = (over: Record<string, unknown> = {}, integral: 'backward' | 'forward' | 'tustin' = 'backward') =>
  discretizeController({ kind: 'pid', kp: 2, ti: 0.8, td: 0.1, n: 8, ...over }, { sampleTime: 0.01, integral }) as DiscretePid;

describe('reference executor: linear behaviour', () => {
  it('every controller kind and method equals its own difference equation when no limit is reached (fast-check)', () => {
    const ctrls = [
      pid({}, 'backward'),
      pid({}, 'forward'),
      pid({}, 'tustin'),
      discretizeController({ kind: 'pid', kp: 1, ti: 0.5, td: 0.05 }, { sampleTime: 0.01, derivative: 'tustin' }),
      discretizeController({ kind: 'lead-lag', k: 3, tLead: 0.2, tLag: 0.02 }, { sampleTime: 0.005 }),
      discretizeController({ kind: 'lead-lag', k: 3, tLead: 0.2, tLag: 0.02 }, { sampleTime: 0.005, method: 'zoh' }),
      discretizeController({ kind: 'lead-lag', k: 3, tLead: 0.2, tLag: 0.02 }, { sampleTime: 0.005, method: 'matched' }),
      discretizeController(
        { kind: 'transfer-function', tf: tfFromCoefficients([4, 3, 1], [0, 2, 1]) },
        { sampleTime: 0.02, method: 'tustin', prewarp: 3 },
      ),
      discretizeController({ kind: 'gain', k: -1.5 }, { sampleTime: 0.1 }),
    ];
    fc.assert(
      fc.property(fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: 1, maxLength: 80 }), (e) => {
        for (const c of ctrls) {
          const u = runController(c, e);
          const ref = filterSequence(c.differenceEquation, e);
          u.forEach((v, k) => expect(Math.abs(v - ref[k])).toBeLessThanOrEqual(1e-9 * (1 + Math.abs(ref[k]))));
        }
      }),
      { numRuns: 60 },
    );
  });
  it('a bumpless start: with zero error the output stays at the initial output (controllers with integral action)', () => {
    const c = pid();
    expect(runController(c, new Array(20).fill(0), { initialOutput: 3.5 }).every((u) => Math.abs(u - 3.5) < 1e-15)).toBe(true);
    // (2s + 1)/(s(0.1s + 1)): integral action behind a filter
    const pi = discretizeController({ kind: 'transfer-function', tf: tfFromCoefficients([1, 2], [0, 1, 0.1]) }, { sampleTime: 0.01 });
    const out = runController(pi, new Array(20).fill(0), { initialOutput: -2 });
    out.forEach((u) => expect(Math.abs(u + 2)).toBeLessThanOrEqual(1e-12));
  });
});

describe('limits and anti-windup', () => {
  const limits = { umin: -1, umax: 1 };
  // e: large positive for 200 samples (deep saturation), then negative
  const e = [...new Array(200).fill(2), ...new Array(300).fill(-0.2)];
  const samplesHigh = (u: number[]) => {
    const i = u.slice(200).findIndex((v) => v < 1 - 1e-12);
    return i < 0 ? Infinity : i;
  };
  it('outputs stay within the limits for every mode', () => {
    for (const aw of ['off', 'back-calculation', 'conditional'] as const) {
      for (const integral of ['backward', 'forward', 'tustin'] as const) {
        const u = runController(pid({ ...limits, antiWindup: aw }, integral), exerciseInput(400, 3));
        expect(u.every((v) => v >= -1 && v <= 1)).toBe(true);
      }
    }
  });
  it('without anti-windup the output stays saturated long after the error reverses; back-calculation and conditional integration recover at once', () => {
    // (no derivative action here: its kick at the reversal would hide the integral's windup)
    const off = samplesHigh(runController(pid({ ...limits, td: 0, antiWindup: 'off' }), e));
    const bc = samplesHigh(runController(pid({ ...limits, td: 0, antiWindup: 'back-calculation' }), e));
    const ci = samplesHigh(runController(pid({ ...limits, td: 0, antiWindup: 'conditional' }), e));
    expect(off).toBeGreaterThan(50);
    expect(bc).toBeLessThan(5);
    expect(ci).toBeLessThan(5);
  });
  it('back-calculation settles where the continuous block does: v − u = ki·tt·e (Åström & Hägglund 2006, §3.5 (from memory))', () => {
    const tt = 0.3;
    const c = pid({ ...limits, antiWindup: 'back-calculation', tt, td: 0 });
    const s = createControllerState(c);
    for (let k = 0; k < 5000; k++) stepController(c, s, 2);
    // backward difference: the next unlimited output is kp·e + I + bi·e (D = 0 in steady state)
    const v = c.coefficients.kp * 2 + s.integral + c.coefficients.bi * 2;
    expect(Math.abs(v - 1 - (2 / 0.8) * tt * 2)).toBeLessThanOrEqual(1e-9);
  });
  it('conditional integration holds the integral while the error pushes further into the limit', () => {
    const c = pid({ ...limits, antiWindup: 'conditional', td: 0 });
    const s = createControllerState(c);
    for (let k = 0; k < 10; k++) stepController(c, s, 2);
    const frozen = s.integral;
    for (let k = 0; k < 50; k++) stepController(c, s, 2);
    expect(s.integral).toBe(frozen);
    stepController(c, s, -0.2); // pulls back: integrates again
    expect(s.integral).toBeLessThan(frozen);
  });
  it('a transfer-type controller with an integrator does not wind up with limited feedback', () => {
    const ctrl = (aw: 'off' | 'limited-feedback') =>
      discretizeController(
        { kind: 'transfer-function', tf: tfFromCoefficients([1, 2], [0, 1]), ...limits, antiWindup: aw },
        { sampleTime: 0.01 },
      );
    expect(samplesHigh(runController(ctrl('off'), e))).toBeGreaterThan(50);
    expect(samplesHigh(runController(ctrl('limited-feedback'), e))).toBeLessThan(3);
  });
});

describe('bumpless parameter change', () => {
  it('PID: a new kp with an unchanged error does not step the output (only the usual integral increment)', () => {
    const a = pid({ td: 0 });
    const b = withCoefficients(a, { ...a.coefficients, kp: 3.2 });
    const s = createControllerState(a);
    let u = 0;
    for (let k = 0; k < 10; k++) u = stepController(a, s, 0.5);
    const cur = retuneController(a, b, s);
    const next = stepController(cur, s, 0.5);
    expect(Math.abs(next - u - a.coefficients.bi * 0.5)).toBeLessThanOrEqual(1e-12);
    // a naive change (no state adjustment) would have stepped by (3.2 − 2)·0.5
    const naive = createControllerState(a);
    for (let k = 0; k < 10; k++) stepController(a, naive, 0.5);
    expect(Math.abs(stepController(b, naive, 0.5) - u - a.coefficients.bi * 0.5 - 1.2 * 0.5)).toBeLessThanOrEqual(1e-12);
  });
  it('transfer-type: w0 takes the change of b0, so a constant error sees no step at the change', () => {
    const a = discretizeController(
      { kind: 'transfer-function', tf: tfFromCoefficients([1, 2], [0, 1]) },
      { sampleTime: 0.01 },
    ) as DiscreteLinear;
    const b = discretizeController(
      { kind: 'transfer-function', tf: tfFromCoefficients([1, 5], [0, 1]) },
      { sampleTime: 0.01 },
    ) as DiscreteLinear;
    const s = createControllerState(a);
    let u = 0;
    let prev = 0;
    for (let k = 0; k < 10; k++) {
      prev = u;
      u = stepController(a, s, 0.5);
    }
    const ramp = u - prev; // the integral increment per sample with the old coefficients
    const cur = retuneController(a, b, s);
    const next = stepController(cur, s, 0.5);
    expect(Math.abs(next - u - ramp)).toBeLessThanOrEqual(1e-12); // same integral gain: no step at all
  });
  it('refuses a change of structure (order, integral method, anti-windup mode)', () => {
    expect(() => retuneController(pid({}, 'backward'), pid({}, 'forward'), createControllerState(pid()))).toThrow(/integral method/);
    const l1 = linearController({ b: [1, 0.5], a: [1, -0.5] }, 0.1);
    const l2 = linearController({ b: [1, 0.5, 0.1], a: [1, -0.5, 0.1] }, 0.1);
    expect(() => retuneController(l1, l2, createControllerState(l1))).toThrow(/order/);
  });
});

describe('test vectors', () => {
  it('a vector replays through the executor with retunes, and a wrong output is detected', () => {
    const c = pid({ umin: -1, umax: 1 });
    const retuned = pid({ kp: 3, umin: -1, umax: 1 });
    const input = exerciseInput(300, 2);
    const v = makeTestVector(c, input, { name: 'axis_pid', retunes: [{ atSample: 150, coefficients: retuned.coefficients }] });
    expect(v.format).toBe('loopwright-test-vector');
    // JSON round trip keeps absent limits (±Infinity) of a retune
    const open = pid({ kp: 2.5 });
    const w = makeTestVector(c, input, { retunes: [{ atSample: 10, coefficients: { ...open.coefficients } }] });
    const back = testVectorFromJson(testVectorToJson(w));
    expect(back).toEqual(w);
    expect(back.retunes[0].coefficients.umax).toBe(Infinity);
    expect(() => testVectorFromJson('{"format":"other"}')).toThrow(/format/);
    expect(() => testVectorFromJson(testVectorToJson({ ...w, output: w.output.slice(1) }))).toThrow(/outputs/);
    expect(testVectorMismatch(v, runController(c, input, { retunes: v.retunes }))).toBe(0);
    const bad = v.output.slice();
    bad[200] += 1e-6;
    expect(testVectorMismatch(v, bad)).toBeGreaterThan(1e-7);
    expect(() => makeTestVector(c, input, { retunes: [{ atSample: 300, coefficients: c.coefficients }] })).toThrow(/atSample/);
  });
});

describe('discretisation settings: clear errors', () => {
  it('names the field at fault', () => {
    expect(() => discretizeController({ kind: 'pid', kp: 1, ti: 1, umin: 1, umax: 0 }, { sampleTime: 0.1 })).toThrow(/umax/);
    expect(() => discretizeController({ kind: 'pid', kp: 1, ti: 1, umin: -1, umax: 1, tt: 0.04 }, { sampleTime: 0.1 })).toThrow(/field tt/);
    expect(() => discretizeController({ kind: 'pid', kp: 1, ti: 0 }, { sampleTime: 0.1 })).toThrow(/field ti/);
    expect(() => discretizeController({ kind: 'pid', kp: 1 }, { sampleTime: 0.1, integral: 'sideways' as never })).toThrow(
      /field integral/,
    );
    expect(() => discretizeController({ kind: 'lead-lag', k: 1, tLead: 1, tLag: 0 }, { sampleTime: 0.1 })).toThrow(/tLag/);
    expect(() => discretizeController({ kind: 'transfer-function', tf: tfFromCoefficients([0, 1], [1]) }, { sampleTime: 0.1 })).toThrow(
      /improper/,
    );
    expect(() => discretizeController({ kind: 'gain', k: 1 }, { sampleTime: -1 })).toThrow(/sample time/);
  });
  it('anti-windup is reported off where it cannot act (no limits, or no integral action)', () => {
    expect(pid().antiWindup).toBe('off');
    expect(discretizeController({ kind: 'pid', kp: 1, umax: 1 }, { sampleTime: 0.1 }).antiWindup).toBe('off');
    expect(pid({ umax: 1 }).antiWindup).toBe('back-calculation');
  });
});
