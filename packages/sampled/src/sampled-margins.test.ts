import { describe, expect, it } from 'vitest';
import { cabs, loopMargins, poly, tfFromCoefficients } from '@loopwright/lti';
import { discreteTransfer, dtDelay } from './discrete.ts';
import { holdEquivalent } from './hold.ts';
import { pulseMargins, sampledMarginFigures, sampledMargins } from './sampled-margins.ts';
import { sampledDelayMargin } from './delay-margin.ts';
import { sampleRateCheck } from './sample-rate.ts';
import { sampledFrequencyResponse, unitCircleEvaluator } from './unit-circle.ts';

const fd = poly.fromDescending;
const DEG = 180 / Math.PI;

describe('unit-circle frequency response', () => {
  it('phase is continuous over the grid and starts at −90° for a loop with one integrator (continuous convention)', () => {
    const H = holdEquivalent(tfFromCoefficients([2], fd([1, 1.5, 0]), 0.27), 0.1);
    const ws = Array.from({ length: 2000 }, (_, i) => 1e-3 + (i * (Math.PI / 0.1 - 1e-3)) / 1999);
    const r = sampledFrequencyResponse(H, ws);
    expect(Math.abs(r.phaseDeg[0] - -90)).toBeLessThan(0.1);
    for (let i = 1; i < ws.length; i++) expect(Math.abs(r.phaseDeg[i] - r.phaseDeg[i - 1])).toBeLessThan(5);
    // the principal argument always agrees modulo 360°
    r.phaseDeg.forEach((p, i) => {
      const d = (p - Math.atan2(r.im[i], r.re[i]) * DEG) / 360;
      expect(Math.abs(d - Math.round(d))).toBeLessThan(1e-9);
    });
  });
  it('the phase at low frequency matches the continuous loop (negative static gain anchored at −180°)', () => {
    const G = tfFromCoefficients([-3], fd([1, 2, 1]));
    const g = unitCircleEvaluator(holdEquivalent(G, 0.05));
    // continuous phase −180° − 2·atan(ω) and half a sample of hold lag (R58), to first order
    const w = 1e-4;
    expect(Math.abs(g(w).phaseDeg - (-180 - (2 * Math.atan(w) + (w * 0.05) / 2) * DEG))).toBeLessThan(1e-6);
    expect(g.integrators).toBe(0);
  });
});

describe('sampled margins: identities', () => {
  const G = holdEquivalent(tfFromCoefficients([1.2], fd([1, 2, 1, 0])), 0.1);
  const m0 = pulseMargins(G);
  it('a whole-sample extra delay z^(−m) keeps the gain crossovers and lowers each PM by m·ωT exactly', () => {
    for (const m of [1, 3]) {
      const mm = pulseMargins(dtDelay(G, m));
      expect(mm.gainCrossovers.length).toBe(m0.gainCrossovers.length);
      expect(Math.abs(mm.gainCrossover! - m0.gainCrossover!)).toBeLessThanOrEqual(1e-9);
      expect(Math.abs(mm.phaseMarginDeg! - (m0.phaseMarginDeg! - m * m0.gainCrossover! * 0.1 * DEG))).toBeLessThanOrEqual(1e-7);
    }
  });
  it('the delay margin is exact for whole samples: stable with floor(DM/T) extra samples, unstable with one more', () => {
    const n = Math.floor(m0.delayMargin! / 0.1);
    expect(pulseMargins(dtDelay(G, n)).closedLoopStable).toBe(true);
    expect(pulseMargins(dtDelay(G, n + 1)).closedLoopStable).toBe(false);
  });
  it('Ms bounds (Skogestad & Postlethwaite, Sec. 2.4.3 (from memory)): GM ≥ Ms/(Ms − 1), PM ≥ 2·asin(1/(2Ms)) on the unit circle too', () => {
    const ms = m0.peakSensitivity!;
    expect(m0.gainMargin!).toBeGreaterThanOrEqual(ms / (ms - 1) - 1e-9);
    expect(m0.phaseMarginDeg!).toBeGreaterThanOrEqual(2 * Math.asin(1 / (2 * ms)) * DEG - 1e-9);
    // Ms is the inverse of the shortest distance from −1 to the curve (dense check)
    let dmin = Infinity;
    for (let i = 1; i <= 200000; i++) {
      const w = (i / 200000) * (Math.PI / 0.1);
      const z = { re: Math.cos(w * 0.1), im: Math.sin(w * 0.1) };
      const v = poly.evalComplex(G.rational.num, z);
      const d = poly.evalComplex(G.rational.den, z);
      const q = { re: (v.re * d.re + v.im * d.im) / (d.re ** 2 + d.im ** 2), im: (v.im * d.re - v.re * d.im) / (d.re ** 2 + d.im ** 2) };
      dmin = Math.min(dmin, Math.hypot(1 + q.re, q.im));
    }
    // the grid can only miss the peak from below
    expect(ms - 1 / dmin).toBeGreaterThanOrEqual(-1e-12 * ms);
    expect(ms - 1 / dmin).toBeLessThanOrEqual(1e-6 * ms);
  });
  it('closed-loop poles, the Jury test and stability agree', () => {
    expect(m0.closedLoopStable).toBe(m0.jury.stable);
    expect(m0.closedLoopPoles.every((p) => cabs(p) < 1)).toBe(m0.closedLoopStable);
    const unstable = pulseMargins(discreteTransfer(poly.scale(G.rational.num, 1.01 * m0.gainMargin!), G.rational.den, 0.1));
    expect(unstable.closedLoopStable).toBe(false);
    expect(unstable.jury.stable).toBe(false);
  });
  it('a conditionally stable loop has a lower gain margin that tends to the continuous one as T → 0', () => {
    // L = 40(s + 0.5)²/(s³(0.05s + 1)): stable only between two gains (phase below −180° at low ω).
    const L = tfFromCoefficients(poly.scale(poly.mul([0.5, 1], [0.5, 1]), 40), poly.mul([0, 0, 0, 1], [1, 0.05]));
    const c = loopMargins(L);
    expect(c.lowerGainMargin).not.toBeNull();
    let prev = Infinity;
    for (const T of [0.01, 0.003, 0.001]) {
      const m = sampledMargins({ plant: L, sampleTime: T });
      const err = Math.abs(m.lowerGainMargin! - c.lowerGainMargin!);
      expect(err).toBeLessThan(prev);
      prev = err;
    }
    expect(prev / c.lowerGainMargin!).toBeLessThan(1e-2);
  });
  it('figures carry the continuous fields plus sampleTime, computeDelay and the Nyquist frequency', () => {
    const m = sampledMargins({ plant: tfFromCoefficients([4], fd([1, 3, 3, 1])), sampleTime: 0.05, computeDelay: 0.5 });
    const f = sampledMarginFigures(m);
    expect(f.sampleTime).toBe(0.05);
    expect(f.computeDelay).toBe(0.5);
    expect(f.nyquistFrequency).toBeCloseTo(Math.PI / 0.05, 12);
    expect(typeof f.gainMargin).toBe('number');
    expect(JSON.parse(JSON.stringify(f))).toEqual(f);
  });
});

describe('sample time against the crossover', () => {
  it('guideline ωc·T ≤ 0.5: silent below, a warning above, an error at or beyond the Nyquist frequency', () => {
    expect(sampleRateCheck(10, 0.02)).toBeNull();
    const w = sampleRateCheck(10, 0.1, 1)!;
    expect(w.code).toBe('slow-sampling');
    expect(w.product).toBeCloseTo(1, 12);
    expect(w.phaseLagDeg).toBeCloseTo(1 * 1.5 * DEG, 9);
    expect(w.suggestedSampleTime[1]).toBeCloseTo(0.05, 12);
    expect(w.guideline).toMatch(/Åström & Wittenmark/);
    expect(sampleRateCheck(10, 0.5)!.level).toBe('error');
  });
  it('sampledMargins reports it for a slow loop, with the continuous estimate labelled as an estimate', () => {
    const L = tfFromCoefficients([20], fd([1, 2, 0]));
    const slow = sampledMargins({ plant: L, sampleTime: 0.2 });
    expect(slow.notes.map((n) => n.code)).toContain('slow-sampling');
    expect(slow.continuousEstimate!.label).toMatch(/estimate/);
    expect(sampledMargins({ plant: L, sampleTime: 0.005 }).notes).toEqual([]);
  });
});

describe('exact delay margin of a sampled loop', () => {
  it('is the boundary: stable with 0.999·DM of extra dead time, not with 1.001·DM; close to the PM/ω reading for a well-filtered loop', () => {
    const plant = tfFromCoefficients([1.2], fd([1, 2, 1, 0]));
    for (const T of [0.1, 0.3]) {
      const dm = sampledDelayMargin({ plant, sampleTime: T })!;
      const at = (f: number) =>
        sampledMargins({ plant: tfFromCoefficients([1.2], fd([1, 2, 1, 0]), f * dm), sampleTime: T }).closedLoopStable;
      expect(at(0.999)).toBe(true);
      expect(at(1.001)).toBe(false);
      const reading = sampledMargins({ plant, sampleTime: T }).delayMargin!;
      expect(Math.abs(dm - reading)).toBeLessThanOrEqual(0.01 * reading);
    }
  });
  it('a whole number of samples of extra delay is exactly the PM/ω reading’s boundary', () => {
    const G = tfFromCoefficients([0.4], fd([1, 1, 0]));
    const T = 0.5;
    const dm = sampledDelayMargin({ plant: G, sampleTime: T })!;
    const reading = sampledMargins({ plant: G, sampleTime: T }).delayMargin!;
    // both lie between the same whole samples
    expect(Math.floor(dm / T)).toBe(Math.floor(reading / T));
  });
  it('0 for a loop that is already unstable; null when stable over the whole scan', () => {
    expect(sampledDelayMargin({ plant: tfFromCoefficients([30], fd([1, 3, 2, 0])), sampleTime: 0.1 })).toBe(0);
    expect(sampledDelayMargin({ plant: tfFromCoefficients([0.01], [1, 1]), sampleTime: 0.1 }, { maxDelay: 1 })).toBeNull();
  });
});
