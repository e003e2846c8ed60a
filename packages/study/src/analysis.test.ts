/**
 * The study engine's analyses against closed forms and textbook examples: locus geometry of
 * the whole diagram (both directions, with common factors removed), closed-loop poles and
 * their Padé marks, L at a cut, the loops table, closed-loop forms.
 */
import { describe, expect, it } from 'vitest';
import { closedLoopPoles } from '@loopwright/graph';
import { cabs, cadd, cexp, cscale, exactStepResponse, type Complex } from '@loopwright/lti';
import { closedLoopStudy, scaledStepResponse } from './closed-loop.ts';
import { chooseCut, cutStudy } from './cuts.ts';
import { locusIdentity, locusStudy } from './locus.ts';
import { loopsStudy } from './loops.ts';
import { polesStudy } from './poles.ts';
import { runStudies, runStudy } from './study.ts';
import { build, r27Cascade as r27, unityLoop } from './testing.ts';
import type { Cx } from './types.ts';

const byRe = (p: Cx[]) => [...p].sort((a, b) => a.re - b.re || a.im - b.im);
const K_PARAM = { kind: 'parameter', name: 'K' } as const;

describe('locus of a sweep', () => {
  const cubic = (K: number) => unityLoop(K, '1/(s*(s + 1)*(s + 2))', { min: 0.1, max: 20 });

  it('K/(s(s+1)(s+2)): breakaway at −1 + 1/√3 with K = 2/(3√3), jω crossing at ω = √2 with K = 6 (Ogata/Nise root-locus rules, from memory) [R02, R03]', () => {
    const L = locusStudy(cubic(2), { target: K_PARAM });
    expect(L.mode).toBe('exact');
    expect(L.direction).toBe('positive');
    expect(L.breakaways).toHaveLength(1);
    expect(L.breakaways[0].s.re).toBeCloseTo(-1 + 1 / Math.sqrt(3), 9);
    expect(L.breakaways[0].gain).toBeCloseTo(2 / (3 * Math.sqrt(3)), 9);
    expect(L.crossings.find((c) => c.omega > 0)!.omega).toBeCloseTo(Math.SQRT2, 8);
    expect(L.crossings.find((c) => c.omega > 0)!.gain).toBeCloseTo(6, 7);
    // Asymptotes: centroid −1, angles ±60°, 180° [R01].
    expect(L.asymptotes!.centroid).toBeCloseTo(-1, 10);
    expect([...L.asymptotes!.anglesDeg].map((a) => Math.abs(a)).sort((a, b) => a - b)).toEqual(
      [60, 60, 180].map((x) => expect.closeTo(x, 9)),
    );
    // The dense trace covers the slider range only.
    for (const b of L.rangeBranches!) for (const k of b.k) expect(k >= 0.1 - 1e-12 && k <= 20 + 1e-9).toBe(true);
  });

  it('one identity for every value of one sign: the locus a drag holds is the one each step would get', () => {
    const d = cubic(2);
    const range = { min: 0.1, max: 20, scale: 'log' as const };
    const at = (value: number, more: object = {}) => locusIdentity(d, { target: K_PARAM, value, range, ...more });
    expect(at(0.5)).toBe(at(17));
    expect(locusStudy(d, { target: K_PARAM, value: 0.5, range })).toBe(locusStudy(d, { target: K_PARAM, value: 17, range }));
    expect(at(-3)).not.toBe(at(3)); // the other direction
    expect(at(3, { opposite: true })).not.toBe(at(3));
    expect(at(3, { range: { min: 0.1, max: 30, scale: 'log' } })).not.toBe(at(3));
    expect(at(3, { overrides: { K: 9 } })).toBe(at(3)); // the swept value is not another parameter
  });

  it('a negative swept value traces the k < 0 locus: breakaway at −1 − 1/√3 with K = −2/(3√3), the other root of dK/ds = 0 [R02]', () => {
    const d = cubic(-0.2);
    d.parameters[0] = { name: 'K', value: -0.2, min: -5, max: -0.01, scale: 'linear' };
    const L = locusStudy(d, { target: K_PARAM });
    expect(L.direction).toBe('negative');
    expect(L.breakaways).toHaveLength(1);
    expect(L.breakaways[0].s.re).toBeCloseTo(-1 - 1 / Math.sqrt(3), 9);
    expect(L.breakaways[0].gain).toBeCloseTo(-2 / (3 * Math.sqrt(3)), 9);
    // k < 0: asymptote angles 2q·180°/3 = 0°, ±120° (Ogata, negative-gain locus rules, from memory).
    expect([...L.asymptotes!.anglesDeg].map((a) => Math.abs(a)).sort((a, b) => a - b)).toEqual(
      [0, 120, 120].map((x) => expect.closeTo(x, 9)),
    );
    for (const b of L.branches) for (const k of b.k) expect(k).toBeLessThanOrEqual(0);
    // The range [−5, −0.01] is traced on the k < 0 side.
    for (const b of L.rangeBranches!) for (const k of b.k) expect(k >= -5 - 1e-9 && k <= -0.01 + 1e-12).toBe(true);
    // Asked for, the other sign is traced too.
    const both = locusStudy(d, { target: K_PARAM, opposite: true });
    for (const b of both.oppositeBranches!) for (const k of b.k) expect(k).toBeGreaterThanOrEqual(0);
  });

  it('removes the factor common to N0 and D0 (a prefilter outside the loop): its pole is a fixed closed-loop pole, not a locus pole and zero', () => {
    const d = unityLoop(2);
    d.blocks.push({ id: 'pre', kind: 'transfer-function', position: { x: 0, y: 100 }, params: { expression: '5/(s + 5)' } });
    d.wires = d.wires.map((w) => (w.id === 'w1' ? { ...w, to: { block: 'pre', port: 'in' } } : w));
    d.wires.push({ id: 'w0', from: { block: 'pre', port: 'out' }, to: { block: 'e', port: 'in1' } });
    const L = locusStudy(d, { target: K_PARAM });
    expect(L.fixedPoles).toHaveLength(1);
    expect(L.fixedPoles[0].re).toBeCloseTo(-5, 9);
    expect(byRe(L.poles).map((p) => p.re)).toEqual([expect.closeTo(-2, 9), expect.closeTo(0, 9)]);
    expect(L.zeros).toEqual([]);
    // The closed-loop poles still include it: s(s + 2) + K = 0 and s = −5 (K = 2: −1 ± j).
    const P = polesStudy(d, { live: { target: K_PARAM, value: 2 } });
    expect(byRe(P.poles).map((p) => [p.re, Math.abs(p.im)])).toEqual([
      [expect.closeTo(-5, 8), expect.closeTo(0, 8)],
      [expect.closeTo(-1, 8), expect.closeTo(1, 8)],
      [expect.closeTo(-1, 8), expect.closeTo(1, 8)],
    ]);
  });

  it('a parameter entering twice gives a sampled locus whose points are closed-loop poles at their values', () => {
    const d = unityLoop(2);
    d.blocks.push({ id: 'h', kind: 'gain', position: { x: 0, y: 100 }, params: { k: 'K' } });
    d.wires = d.wires.map((w) => (w.id === 'fb' ? { ...w, to: { block: 'h', port: 'in' } } : w));
    d.wires.push({ id: 'fb2', from: { block: 'h', port: 'out' }, to: { block: 'e', port: 'in2' } });
    d.cuts = [{ id: 'c1', wire: 'fb2' }];
    const L = locusStudy(d, { target: K_PARAM });
    expect(L.mode).toBe('sampled');
    expect(L.reason).toMatch(/more than once|affinely/);
    // s² + 2s + K² = 0 at every sample: check a few points against the closed form.
    const b = L.branches[0];
    for (const i of [0, Math.floor(b.k.length / 2), b.k.length - 1]) {
      const s: Complex = { re: b.re[i], im: b.im[i] };
      const K = b.k[i];
      const res = Math.hypot(s.re * s.re - s.im * s.im + 2 * s.re + K * K, 2 * s.re * s.im + 2 * s.im);
      expect(res).toBeLessThan(1e-8 * Math.max(1, K * K));
    }
  });

  it('refuses an unknown target by name', () => {
    expect(() => locusStudy(unityLoop(2), { target: { kind: 'parameter', name: 'Kz' } })).toThrow(/"Kz" is not a named parameter/);
  });
});

describe('closed-loop poles', () => {
  it('K/(s(s+2)) in unity feedback: −1 ± √(1 − K) (roots of s² + 2s + K), the same through the sweep split and the reduction', () => {
    for (const K of [0.5, 4]) {
      const viaSplit = byRe(polesStudy(unityLoop(1), { live: { target: K_PARAM, value: K } }).poles);
      const viaReduction = byRe(polesStudy(unityLoop(K)).poles);
      const disc = 1 - K;
      const want =
        disc >= 0
          ? [
              { re: -1 - Math.sqrt(disc), im: 0 },
              { re: -1 + Math.sqrt(disc), im: 0 },
            ]
          : [
              { re: -1, im: -Math.sqrt(-disc) },
              { re: -1, im: Math.sqrt(-disc) },
            ];
      for (const got of [viaSplit, viaReduction]) {
        got.forEach((p, i) => {
          expect(p.re).toBeCloseTo(want[i].re, 8);
          expect(p.im).toBeCloseTo(want[i].im, 8);
        });
      }
    }
  });

  it('with a dead time in the loop, poles that survive a higher Padé order approximate roots of s + 0.5e^(−s) = 0; the others belong to the approximant (loop of R24)', () => {
    const d = unityLoop(0.5, 'exp(-s)/s');
    const P = polesStudy(d);
    expect(P.delayHandling.mode).toBe('pade');
    expect(P.origin.every((o) => o !== 'exact')).toBe(true);
    const approx = P.poles.filter((_, i) => P.origin[i] === 'approximated');
    const artefacts = P.poles.filter((_, i) => P.origin[i] === 'approximant');
    expect(approx.length).toBeGreaterThanOrEqual(2);
    expect(artefacts.length).toBeGreaterThanOrEqual(1);
    // Residual of the exact characteristic equation 1 + 0.5e^(−s)/s = 0, i.e. s + 0.5e^(−s) (independent of Padé).
    const residual = (s: Complex) => cabs(cadd(s, cscale(cexp({ re: -s.re, im: -s.im }), 0.5))) / Math.max(1, cabs(s));
    for (const s of approx) expect(residual(s)).toBeLessThan(1e-3);
    for (const s of artefacts) expect(residual(s)).toBeGreaterThan(1e-2);
    // The dominant pair is stable (PM 61° in R24): the closed loop is stable.
    expect(P.stable).toBe(true);
  });
});

describe('Padé marks everywhere the poles appear', () => {
  // Loop of R24 (L = 0.5e^(−s)/s): the exact characteristic equation is s + 0.5e^(−s) = 0.
  const residual = (s: Complex) => cabs(cadd(s, cscale(cexp({ re: -s.re, im: -s.im }), 0.5))) / Math.max(1, cabs(s));
  const d = () => unityLoop(0.5, 'exp(-s)/s');

  it('the loops table marks its closed-loop poles exactly as the poles study does', () => {
    const L = loopsStudy(d());
    const P = polesStudy(d());
    expect(L.closedLoopPoles).toEqual(P.poles);
    expect(L.closedLoopPoleOrigin).toEqual(P.origin);
    expect(L.delayHandling.mode).toBe('pade');
  });

  it('a closed-loop form marks its poles: those marked approximated solve s + 0.5e^(−s) = 0, the others do not [R24]', () => {
    const c = closedLoopStudy(d(), { from: { block: 'r' }, to: { block: 'y' } });
    expect(c.delayHandling.mode).toBe('pade');
    expect(c.poleOrigin).toHaveLength(c.poles.length);
    const approx = c.poles.filter((_, i) => c.poleOrigin[i] === 'approximated');
    const artefacts = c.poles.filter((_, i) => c.poleOrigin[i] === 'approximant');
    expect(approx.length).toBeGreaterThanOrEqual(2);
    expect(artefacts.length).toBeGreaterThanOrEqual(1);
    for (const s of approx) expect(residual(s)).toBeLessThan(1e-3);
    for (const s of artefacts) expect(residual(s)).toBeGreaterThan(1e-2);
    // Without a dead time nothing is approximated.
    const plain = closedLoopStudy(unityLoop(2), { from: { block: 'r' }, to: { block: 'y' } });
    expect(plain.poleOrigin.every((o) => o === 'exact')).toBe(true);
  });

  it('the locus marks its open-loop poles: the Padé denominator roots are artefacts, the integrator is not', () => {
    const L = locusStudy(d(), { target: K_PARAM });
    expect(L.delayHandling.mode).toBe('pade');
    expect(L.poleOrigin).toHaveLength(L.poles.length);
    const origin = L.poles.map((p, i) => [Math.hypot(p.re, p.im) < 1e-9, L.poleOrigin[i]] as const);
    expect(origin.filter(([atZero]) => atZero).map(([, o]) => o)).toEqual(['approximated']);
    expect(origin.filter(([atZero]) => !atZero).every(([, o]) => o === 'approximant')).toBe(true);
  });

  it('a Padé order at the top of the range is compared two orders lower (never an order the approximant refuses)', () => {
    expect(() => polesStudy(d(), { padeOrder: 10 })).not.toThrow();
    expect(polesStudy(d(), { padeOrder: 10 }).origin.some((o) => o === 'approximated')).toBe(true);
  });
});

describe('L at a cut', () => {
  it('margins of L = 4/(s(s+2)): |L(jωc)| = 1 at ωc² = −2 + √20, PM = 90° − atan(ωc/2) (closed form); S and T by their definitions', () => {
    const f = cutStudy(unityLoop(4), { cut: 'c1' })!;
    const wc = Math.sqrt(-2 + Math.sqrt(20));
    expect(f.margins.gainCrossover).toBeCloseTo(wc, 6);
    expect(f.margins.phaseMarginDeg).toBeCloseTo(90 - (Math.atan(wc / 2) * 180) / Math.PI, 5);
    expect(f.margins.gainMarginDb).toBeNull();
    expect(f.openLoopRhpPoles).toBe(0);
    for (let i = 0; i < f.omega.length; i += 50) {
      const one = Math.hypot(1 + f.re[i], f.im[i]);
      expect(10 ** (f.sensDb[i] / 20) * one).toBeCloseTo(1, 9);
      expect(10 ** (f.compDb[i] / 20)).toBeCloseTo(Math.hypot(f.re[i], f.im[i]) / one, 9);
    }
  });

  it('counts the open-loop right-half-plane poles of L: 3/(s − 1) has one (and is stable closed: s + 2)', () => {
    const f = cutStudy(unityLoop(3, '1/(s - 1)', { min: 0.5, max: 10 }), { cut: null })!;
    expect(f.cutId).toBe('c1');
    expect(f.openLoopRhpPoles).toBe(1);
    expect(f.margins.closedLoopStable).toBe(true);
  });

  it('the default cut: the active one, the first, else one proposed on the feedback wire; an unknown one is refused unless falling back', () => {
    const d = unityLoop(2);
    expect(chooseCut(d, null)?.id).toBe('c1');
    expect(() => chooseCut(d, 'gone')).toThrow(/cut gone is not in the diagram/);
    expect(chooseCut(d, 'gone', {}, true)?.id).toBe('c1');
    d.cuts = [];
    expect(chooseCut(d, null)).toEqual({ id: 'auto:fb', wire: 'fb', label: 'loop at fb (proposed)', auto: true });
  });
});

describe('loops table', () => {
  it('R27 cascade: T = 10/(s² + 6s + 10) closed-loop poles −3 ± j; the inner loop read inner-first is C2G2 = 5/(s+1) (Nise, Sec. 5.2, from memory) [R27]', () => {
    const L = loopsStudy(r27());
    expect(byRe(L.closedLoopPoles).map((p) => [p.re, Math.abs(p.im)])).toEqual([
      [expect.closeTo(-3, 8), expect.closeTo(1, 8)],
      [expect.closeTo(-3, 8), expect.closeTo(1, 8)],
    ]);
    const inner = L.rows.find((r) => r.cutId === 'ci')!;
    expect(inner.alone!.opened).toEqual(['co']); // opened loops named by cut id
    // 5/(s+1): |L| = 1 at ω = √24, PM = 180° − atan(√24).
    expect(inner.alone!.margins.gainCrossover).toBeCloseTo(Math.sqrt(24), 6);
    expect(inner.alone!.margins.phaseMarginDeg).toBeCloseTo(180 - (Math.atan(Math.sqrt(24)) * 180) / Math.PI, 5);
    expect(inner.alone!.openLoopRhpPoles).toBe(0);
    expect(inner.openLoopRhpPoles).toBe(0);
  });

  it('real vs ideal inner loop: one configuration for curves and margins, for every nested pair', () => {
    const L = loopsStudy(r27());
    expect(L.outerVsIdeal).toHaveLength(1);
    const o = L.outerVsIdeal[0];
    expect([o.inner, o.outer]).toEqual(['ci', 'co']);
    // Ideal inner loop: the outer loop is C1·G1 = 2/s: crossover 2, PM 90° (closed form).
    expect(o.idealMargins.gainCrossover).toBeCloseTo(2, 8);
    expect(o.idealMargins.phaseMarginDeg).toBeCloseTo(90, 6);
    // Real inner loop, outer loop read alone: C1·(5/(s+6))·(1/s) = 10/(s(s+6)); the curve is that L.
    for (let i = 0; i < o.omega.length; i += 37) {
      const w = o.omega[i];
      expect(o.realMagDb[i]).toBeCloseTo(20 * Math.log10(10 / (w * Math.hypot(w, 6))), 8);
      expect(o.idealMagDb[i]).toBeCloseTo(20 * Math.log10(2 / w), 8);
    }
    const outerRow = L.rows.find((r) => r.cutId === 'co')!;
    expect(o.realMargins).toEqual(outerRow.alone?.margins ?? outerRow.margins);
  });

  it("every cut's frequency data on request: the same as the cut study of that cut", () => {
    const L = loopsStudy(r27(), { frequency: true });
    for (const row of L.rows) expect(row.frequency).toEqual(cutStudy(r27(), { cut: row.cutId }));
    expect(loopsStudy(r27()).rows.every((r) => r.frequency === null)).toBe(true);
  });

  it('a three-loop cascade gives two nested pairs, each compared in its own inner-first configuration', () => {
    const d = build(
      [
        ['ref', 'source'],
        ['ePos', 'summing-junction', { signs: '+-' }],
        ['Cpos', 'gain', { k: 'Kpos' }],
        ['eVel', 'summing-junction', { signs: '+-' }],
        ['Cvel', 'pid', { kp: 0.2, ti: 0.02 }],
        ['eCur', 'summing-junction', { signs: '+-' }],
        ['Ccur', 'pid', { kp: 2, ti: 0.002 }],
        ['winding', 'first-order-lag', { k: 1, tau: 0.002 }],
        ['mech', 'integrator', { k: 1000 }],
        ['axis', 'integrator', { k: 1 }],
        ['pos', 'probe'],
      ],
      [
        'ref->ePos.in1',
        'ePos->Cpos',
        'Cpos->eVel.in1',
        'eVel->Cvel',
        'Cvel->eCur.in1',
        'eCur->Ccur',
        'Ccur->winding',
        'fbCur:winding->eCur.in2',
        'winding->mech',
        'fbVel:mech->eVel.in2',
        'mech->axis',
        'fbPos:axis->ePos.in2',
        'axis->pos',
      ],
      [{ name: 'Kpos', value: 40 }],
      {
        cuts: [
          { id: 'current', wire: 'fbCur' },
          { id: 'speed', wire: 'fbVel' },
          { id: 'position', wire: 'fbPos' },
        ],
      },
    );
    const L = loopsStudy(d);
    expect(L.outerVsIdeal.map((o) => `${o.inner}<${o.outer}`).sort()).toEqual(['current<speed', 'speed<position']);
    const speedPair = L.outerVsIdeal.find((o) => o.outer === 'speed')!;
    expect(speedPair.opened).toEqual(['position']);
    const speedRow = L.rows.find((r) => r.cutId === 'speed')!;
    expect(speedPair.realMargins).toEqual(speedRow.alone!.margins);
    expect(speedPair.realLoop).toEqual(speedRow.alone!.loop);
  });
});

describe('closed-loop forms between two points', () => {
  it('R27 from r to y: 10/(s² + 6s + 10) [R27]', () => {
    const c = closedLoopStudy(r27(), { from: { block: 'r' }, to: { block: 'y' } });
    expect(c.transfer.den.map((x) => x / c.transfer.den[2])).toEqual([expect.closeTo(10, 9), expect.closeTo(6, 9), expect.closeTo(1, 12)]);
    expect(c.transfer.num[0] / c.transfer.den[2]).toBeCloseTo(10, 9);
    expect(c.staticGain).toBeCloseTo(1, 12);
  });

  it('step and Bode of 2e^(−1.5s)/(5s + 1): y(6.5) = 1.26424, y(11.5) = 1.72933, zero before the dead time; |G(jω)| = 2/√(1 + 25ω²) [R41]', () => {
    const d = build(
      [
        ['u', 'source'],
        ['g', 'transfer-function', { expression: '2*exp(-1.5*s)/(5*s + 1)' }],
        ['y', 'probe'],
      ],
      ['u->g', 'g->y'],
    );
    const c = closedLoopStudy(d, { from: { block: 'u' }, to: { block: 'y' }, step: true, bode: true });
    expect(c.transfer.delay).toBeCloseTo(1.5, 12);
    const at = (t: number) => {
      const i = c.step!.time.findIndex((x) => x >= t);
      const [t0, t1] = [c.step!.time[i - 1], c.step!.time[i]];
      const [y0, y1] = [c.step!.value[i - 1], c.step!.value[i]];
      return y0 + ((t - t0) / (t1 - t0)) * (y1 - y0);
    };
    const exact = (t: number) => (t <= 1.5 ? 0 : 2 * (1 - Math.exp(-(t - 1.5) / 5)));
    for (const t of c.step!.time) expect(c.step!.value[c.step!.time.indexOf(t)]).toBeCloseTo(exact(t), 9);
    expect(at(6.5)).toBeCloseTo(1.26424, 3); // interpolated between samples
    expect(exact(11.5)).toBeCloseTo(1.72933, 5);
    for (let i = 0; i < c.bode!.omega.length; i += 40) {
      const w = c.bode!.omega[i];
      expect(c.bode!.magDb[i]).toBeCloseTo(20 * Math.log10(2 / Math.sqrt(1 + 25 * w * w)), 9);
    }
  });
});

describe('the step response of a closed-loop form over decades of pole speeds', () => {
  it('Π aᵢ/(s + aᵢ) with a = 1, 30, 1e3, 3e4, 1e5, 3e5 (coefficients up to 9e20): y = 1 − Σ e^(−aᵢt) Π_{j≠i} aⱼ/(aⱼ − aᵢ) (partial fractions)', () => {
    const a = [1, 30, 1e3, 3e4, 1e5, 3e5];
    const expression = a.map((x) => `${x}/(s + ${x})`).join('*');
    const d = build(
      [
        ['u', 'source'],
        ['g', 'transfer-function', { expression }],
        ['y', 'probe'],
      ],
      ['u->g', 'g->y'],
    );
    const c = closedLoopStudy(d, { from: { block: 'u' }, to: { block: 'y' }, step: true });
    const exact = (t: number) =>
      1 -
      a.reduce((sum, ai, i) => {
        const k = a.reduce((p, aj, j) => (j === i ? p : (p * aj) / (aj - ai)), 1);
        return sum + k * Math.exp(-ai * t);
      }, 0);
    const { time, value } = c.step!;
    for (let i = 0; i < time.length; i += 20) expect(value[i]).toBeCloseTo(exact(time[i]), 6);
    // Final-value theorem: T(0) = 1.
    expect(value[value.length - 1]).toBeCloseTo(c.staticGain, 2);
  });

  it('a well-scaled system is left alone (the same numbers as the unscaled exact response)', () => {
    const r = { num: [2], den: [2, 3, 1] };
    const t = [0, 0.5, 1, 2, 4];
    expect(scaledStepResponse(r, t, 0.3)).toEqual(exactStepResponse(r, t, 0.3));
  });
});

describe('a batch of studies', () => {
  it('each part fails on its own, with its reason and where', () => {
    const d = unityLoop(2);
    const parts = runStudies(d, [
      { kind: 'poles' },
      { kind: 'locus', target: { kind: 'parameter', name: 'nope' } },
      { kind: 'cut', cut: 'zzz' },
    ]);
    expect(parts[0].ok).toBe(true);
    expect(parts[1]).toMatchObject({ ok: false, reason: 'input', at: 'sweep' });
    expect(parts[2]).toMatchObject({ ok: false, reason: 'input', at: 'cut' });
    // The same answer one at a time.
    const p = runStudy(d, { kind: 'poles' });
    expect(parts[0].ok && parts[0].value.kind === 'poles' && parts[0].value.value).toEqual(p);
    expect(closedLoopPoles(d).length).toBe(p.poles.length);
  });
});
