// The loop at a diagram cut read at its sampled controller: exact pulse transfer function
// (rows R54, R55, R59, R60 of the reference table, copied here with their sources), the
// continuous estimate beside it, the T → 0 limit and the multirate notes.
import { describe, expect, it } from 'vitest';
import { cabs, cdiv, cmul, cx, polyRoots } from '@loopwright/lti';
import { diagramOf, threeLoopAxis } from '@loopwright/graph/testing';
import type { ParamValue } from '@loopwright/graph';
import { runStudy } from './study.ts';

const single = (ctrl: [string, 'gain' | 'pid' | 'lead-lag', Record<string, ParamValue>], plant: string) =>
  diagramOf(
    [['r', 'source'], ['e', 'summing-junction', { signs: '+-' }], ctrl, ['G', 'transfer-function', { expression: plant }], ['y', 'probe']],
    ['r->e.in1', `e->${ctrl[0]}`, `${ctrl[0]}->G`, 'fb:G->e.in2', 'G->y'],
    [],
    { cuts: [{ id: 'loop', wire: 'fb' }] },
  );

describe('sampled loop at a diagram cut', () => {
  it('R59: gain block K = 1 sampled at T = 1 before 1/(s(s+1)): GM = (e − 1)/(e − 2), poles 0.5 ± 0.6182j', () => {
    // ZOH equivalent: Franklin, Powell & Workman (1998), ch. 4 (from memory); Jury (1964) (from memory) [R54 (c), R59]
    const d = single(['K', 'gain', { k: 1, sampleTime: 1 }], '1/(s*(s+1))');
    const r = runStudy(d, { kind: 'sampled-cut', cut: 'loop', locus: true })!;
    expect(r.sampler).toBe('K');
    expect(r.exact).toBe(true);
    expect(Math.abs(r.margins!.gainMargin! - 2.3922)).toBeLessThan(1e-4);
    expect(r.margins!.sampleTime).toBe(1);
    // G(z) of R54 (c): (0.367879z + 0.264241)/(z² − 1.367879z + 0.367879), ascending here
    const lead = r.pulse!.den[r.pulse!.den.length - 1];
    [0.264241, 0.367879].forEach((c, i) => expect(Math.abs(r.pulse!.num[i] / lead - c)).toBeLessThan(1e-6));
    [0.367879, -1.367879, 1].forEach((c, i) => expect(Math.abs(r.pulse!.den[i] / lead - c)).toBeLessThan(1e-6));
    for (const p of r.closedLoopPoles) {
      expect(Math.abs(p.re - 0.5)).toBeLessThan(1e-4);
      expect(Math.abs(Math.abs(p.im) - 0.6182)).toBeLessThan(1e-4);
    }
    expect(r.closedLoopStable).toBe(true);
    // z-plane locus: the branches leave the unit circle at Kcrit, angle 1.3244 rad [R59]
    const { locus: zl } = r;
    if (!zl) throw new Error('no z-plane locus');
    expect(Math.abs(zl.criticalGain! - 2.3922)).toBeLessThan(1e-4);
    const c = zl.crossings.find((x) => Math.abs(x.gain - 2.3922) < 1e-3)!;
    expect(Math.abs(c.theta - 1.3244)).toBeLessThan(1e-4);
    expect(zl.guides.unitCircle.length).toBeGreaterThan(16);
    expect(r.estimate!.label).toMatch(/estimate/);
    // the frequency response stops at the Nyquist frequency π/T
    expect(Math.max(...r.frequency!.omega)).toBeCloseTo(Math.PI, 9);
  });

  it('R54 (a) + R55: a Tustin PI (Kc = 2, Ti = 3, T = 0.5) before 1/(s + 2): closed-loop poles of the closed forms', () => {
    // Tustin PI: C(z) = (13/6·z − 11/6)/(z − 1) [R55, Franklin, Powell & Workman (1998), ch. 6 (from memory)];
    // ZOH of 1/(s + a): ((1 − e^(−aT))/a)/(z − e^(−aT)) [R54 (a)]. Characteristic: (z − 1)(z − p) + g·(13/6·z − 11/6) = 0.
    const d = single(['C', 'pid', { kp: 2, ti: 3, td: 0, sampleTime: 0.5, integral: 'tustin' }], '1/(s+2)');
    const r = runStudy(d, { kind: 'sampled-cut', cut: null })!;
    const p = Math.exp(-1);
    const g = (1 - p) / 2;
    const expected = polyRoots([p - (11 / 6) * g, -1 - p + (13 / 6) * g, 1]);
    expect(r.closedLoopPoles).toHaveLength(2);
    for (const z of expected)
      expect(Math.min(...r.closedLoopPoles.map((w) => cabs({ re: w.re - z.re, im: w.im - z.im })))).toBeLessThan(1e-9);
    // the gain crossover value: |G(e^(jωcT))| = 1 from the closed forms
    const w = r.margins!.gainCrossover!;
    const z = cx(Math.cos(w * 0.5), Math.sin(w * 0.5));
    const G = cmul(cdiv(cx((13 / 6) * z.re - 11 / 6, (13 / 6) * z.im), cx(z.re - 1, z.im)), cdiv(cx(g, 0), cx(z.re - p, z.im)));
    expect(Math.abs(cabs(G) - 1)).toBeLessThan(1e-7);
  });

  it('R60: as T → 0 the sampled gain margin at the cut tends to the continuous 6 (Routh, R03)', () => {
    // values of R60 (derived in the reference table); continuous limit R03
    const rows: [number, number, number][] = [
      [1, 2.6255, 1e-4],
      [0.1, 5.2315, 1e-4],
      [0.01, 5.9115, 1e-4],
      [0.001, 5.991, 1e-3],
    ];
    const pm: number[] = [];
    for (const [T, k, tol] of rows) {
      const r = runStudy(single(['K', 'gain', { k: 1, sampleTime: T }], '1/(s*(s+1)*(s+2))'), { kind: 'sampled-cut', cut: 'loop' })!;
      expect(Math.abs(r.margins!.gainMargin! - k)).toBeLessThan(tol);
      expect(Math.abs(r.continuous!.gainMargin! - 6)).toBeLessThan(1e-6);
      pm.push(Math.abs(r.margins!.phaseMarginDeg! - r.continuous!.phaseMarginDeg!));
    }
    // the phase-margin gap shrinks with T (about ωc·T/2 of phase: common practice, no source)
    for (let i = 1; i < pm.length; i++) expect(pm[i]).toBeLessThan(pm[i - 1]);
    expect(pm[pm.length - 1]).toBeLessThan(0.05);
  });

  it('the continuous estimate (hold as e^(−sT/2)) is close to the exact reading at a fast rate, and labelled', () => {
    const r = runStudy(
      single(['C', 'lead-lag', { k: 4, tLead: 0.5, tLag: 0.05, sampleTime: 0.005, computeDelay: 0.5, method: 'tustin' }], '1/(s*(s+1))'),
      { kind: 'sampled-cut', cut: 'loop' },
    )!;
    expect(r.exact).toBe(true);
    expect(r.estimate!.label).toMatch(/approximation, not the sampled loop/);
    expect(Math.abs(r.estimate!.margins.phaseMarginDeg! - r.margins!.phaseMarginDeg!)).toBeLessThan(1);
    expect(r.warnings).toEqual([]);
  });

  it('warns when the sample time is slow for the crossover', () => {
    const r = runStudy(single(['K', 'gain', { k: 10, sampleTime: 0.2 }], '1/(s*(s+1))'), { kind: 'sampled-cut', cut: 'loop' })!;
    expect(r.warnings.map((w) => w.code)).toEqual(['slow-sampling']);
  });

  it('a continuous diagram has no sampled reading', () => {
    expect(runStudy(single(['K', 'gain', { k: 1 }], '1/(s*(s+1))'), { kind: 'sampled-cut', cut: 'loop' })).toBeNull();
  });

  it('multirate cascade: each loop is read at its own sampler, the other rates are estimates and say so', () => {
    const d = threeLoopAxis();
    const rates: Record<string, number> = { Ccur: 1 / 16000, Cvel: 1 / 4000, Cpos: 1 / 1000 };
    d.blocks = d.blocks.map((b) => (b.id in rates ? { ...b, params: { ...b.params, sampleTime: rates[b.id], computeDelay: 1 } } : b));
    const pos = runStudy(d, { kind: 'sampled-cut', cut: 'position' })!;
    expect(pos.sampler).toBe('Cpos');
    expect(pos.exact).toBe(false);
    expect(pos.roles.map((x) => x.role)).toEqual(['sampler', 'estimate', 'estimate']);
    expect(pos.notes.join(' ')).toMatch(/approximated: Cvel .*Ccur/);
    const vel = runStudy(d, { kind: 'sampled-cut', cut: 'speed' })!;
    expect(vel.sampler).toBe('Cvel');
    expect(vel.notes.join(' ')).toMatch(/Cvel also sits in the loops closed around this cut/);
    const cur = runStudy(d, { kind: 'sampled-cut', cut: 'current' })!;
    expect(cur.sampler).toBe('Ccur');
    expect(cur.sampleTime).toBe(1 / 16000);
    expect(cur.closedLoopStable).toBe(true);
    // the sampled loop loses phase against the continuous design (hold and one sample of delay)
    expect(cur.margins!.phaseMarginDeg!).toBeLessThan(cur.continuous!.phaseMarginDeg!);
  });
});

describe('the multirate axis demo', () => {
  it('each loop is read at its own sampler, stable, with the rate of its controller', async () => {
    const { sampledAxis } = await import('@loopwright/graph');
    const rates: Record<string, [string, number]> = {
      'cut-current': ['current-controller', 6.25e-5],
      'cut-speed': ['speed-controller', 2.5e-4],
      'cut-position': ['position-controller', 1e-3],
    };
    for (const [cut, [block, T]] of Object.entries(rates)) {
      const r = runStudy(sampledAxis, { kind: 'sampled-cut', cut })!;
      expect(r.sampler).toBe(block);
      expect(r.sampleTime).toBe(T);
      expect(r.closedLoopStable).toBe(true);
      expect(r.warnings).toEqual([]);
      // hold and one sample of delay cost phase against the continuous design, about ωc·T·1.5 (common practice, no source)
      const lost = r.continuous!.phaseMarginDeg! - r.margins!.phaseMarginDeg!;
      expect(lost).toBeGreaterThan(0);
      expect(Math.abs(r.estimate!.margins.phaseMarginDeg! - r.margins!.phaseMarginDeg!)).toBeLessThan(0.5);
    }
  });
});
