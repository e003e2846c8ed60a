import { describe, expect, it } from 'vitest';
import { type Complex, cabs, csub, cx, poly, polyRoots, revalComplex, rootSetMismatch } from '@loopwright/lti';
import { demoDiagrams } from '../demos/index.ts';
import { closedLoop, closedLoopPoles } from './reduce.ts';
import { assembleStateSpace, closedLoopPolesStateSpace, evaluateStateSpace } from './state-space.ts';
import { sweepLocus } from './sweep.ts';
import { analyseLoops } from './loops.ts';
import { loopAtCut } from './cuts.ts';

const rootError = (got: Complex[], want: Complex[]) => rootSetMismatch(got, want, 1e-12);

const demo = (id: string) => demoDiagrams.find((x) => x.id === id)!.diagram;
const pade = { delays: 'pade' as const };

describe.each(demoDiagrams.map((x) => [x.id]))('demo %s: method A against method B', (id) => {
  const d = demo(id);
  const sources = d.blocks.filter((b) => b.kind === 'source').map((b) => b.id);
  const probes = d.blocks.filter((b) => b.kind === 'probe').map((b) => b.id);

  it('same closed-loop poles (roots of the elimination determinant vs ml-matrix eigenvalues)', () => {
    const a = closedLoopPoles(d, undefined, pade);
    const b = closedLoopPolesStateSpace(d);
    expect(a.length).toBeGreaterThan(3);
    expect(rootError(b, a)).toBeLessThan(1e-6);
  });

  it('same transfer from every source to every probe at test points spread over the poles', () => {
    const poles = closedLoopPoles(d, undefined, pade);
    const mags = poles.map(cabs).filter((m) => m > 0);
    const scales = [Math.min(...mags), Math.sqrt(Math.min(...mags) * Math.max(...mags)), Math.max(...mags)];
    const points = scales.flatMap((r) => [cx(0, r), cx(0.3 * r, 0.8 * r), cx(-0.05 * r, 1.7 * r)]);
    for (const from of sources) {
      for (const to of probes) {
        const a = closedLoop(d, { block: from }, { block: to }, undefined, pade);
        const sys = assembleStateSpace(d, { block: from }, { block: to });
        for (const s of points) {
          const va = revalComplex(a.tf.rational, s);
          const vb = evaluateStateSpace(sys, s);
          expect(cabs(csub(va, vb)), `${from} → ${to} at ${s.re}+${s.im}j`).toBeLessThanOrEqual(
            1e-7 * Math.max(cabs(va), cabs(vb), 1e-12) + 1e-12,
          );
        }
      }
    }
  });

  it('every cut: 1 + L = 0 gives the closed-loop poles of the diagram (less those the cut cannot see)', () => {
    // Mason: Δ_closed = Δ_cut·(1 + L) (Mason 1956, from memory); with dead times approximated alike.
    const all = closedLoopPoles(d, undefined, pade);
    for (const cut of d.cuts) {
      const L = loopAtCut(d, cut.wire, undefined, pade);
      const roots = polyRoots(poly.add(L.rational.den, L.rational.num));
      for (const r of roots) {
        const nearest = Math.min(...all.map((p) => cabs(csub(p, r)) / Math.max(1e-12, cabs(p))));
        expect(nearest, `cut ${cut.id}`).toBeLessThan(1e-6);
      }
    }
  });
});

describe('positioning-axis demo', () => {
  const d = demo('positioning-axis');

  it('a sweep of the position gain reproduces the poles of the diagram reduced afresh at 20 gains', () => {
    const sw = sweepLocus(d, 'Kp_pos');
    expect(sw.mode).toBe('exact');
    if (sw.mode !== 'exact') return;
    for (let i = 0; i < 20; i++) {
      const k = 5 * 40 ** (i / 19); // 5 … 200, the demo's sweep range, log spaced
      const fromSweep = polyRoots(poly.add(sw.d0, poly.scale(sw.n0, k)));
      const fresh = closedLoopPoles(d, { Kp_pos: k });
      expect(rootError(fromSweep, fresh)).toBeLessThan(1e-6);
      // The locus geometry's polynomials plus the fixed poles give the same set.
      const geometric = polyRoots(poly.add(sw.locus.den, poly.scale(sw.locus.num, k)));
      expect(rootError([...geometric, ...sw.fixedPoles], fresh)).toBeLessThan(1e-6);
    }
    // The two encoders carry identical Padé approximants fed from related signals: one copy's
    // poles do not move with the gain (a mode the loops cannot see).
    expect(sw.fixedPoles.length).toBe(3);
  });

  it('the speed gain also sweeps exactly; the encoder delay only by samples', () => {
    expect(sweepLocus(d, 'Kp_spd').mode).toBe('exact');
    const enc = sweepLocus(d, 'T_enc', {}, { samples: 12 });
    expect(enc.mode).toBe('sampled');
  });

  it('loops: three cuts, two nested pairs, position reference reaches position with unit static gain', () => {
    const rep = analyseLoops(d);
    expect(rep.cuts.length).toBe(3);
    expect(rep.stable).toBe(true);
    expect(rep.separations.map((s) => `${s.inner}<${s.outer}`).sort()).toEqual(['cut-current<cut-speed', 'cut-speed<cut-position']);
    const t = closedLoop(d, { block: 'position-setpoint' }, { block: 'position' });
    // Type-1 loop (integrating pulley): zero steady-state position error (final-value theorem, Nise Sec. 7.3 (from memory)).
    expect(Math.abs(t.staticGain - 1)).toBeLessThan(1e-9);
    expect(t.delayHandling.mode).toBe('pade');
  });
});

describe('heating-cascade demo', () => {
  const d = demo('heating-cascade');
  it('the valve operating point added and removed again reaches nothing', () => {
    const t = closedLoop(d, { block: 'valve-operating-point' }, { block: 'room-temperature' });
    expect(t.tf.rational.num.length).toBe(0);
  });
  it('room loop with integral action: unit static gain from setpoint to room temperature', () => {
    const t = closedLoop(d, { block: 'room-setpoint' }, { block: 'room-temperature' });
    expect(Math.abs(t.staticGain - 1)).toBeLessThan(1e-9);
  });
});

describe('positioning axis: outer loop against an ideal inner loop', () => {
  it('an ideal speed loop leaves the position loop Kp_pos·e^(−T_enc·s)/s, with its closed-form margins', () => {
    // With the speed loop ideal (motor speed = demand), the position loop is Kp_pos/r_pulley ·
    // r_pulley/s · e^(−T s) = k e^(−θs)/s: ωgc = k, PM = 90° − kθ, GM = π/(2kθ) — the
    // integrator-plus-dead-time formulas of reference row R24 (derived there from the definitions).
    const d = demo('positioning-axis');
    const value = (n: string) => d.parameters.find((p) => p.name === n)!.value;
    const k = value('Kp_pos');
    const theta = value('T_enc');
    const pair = analyseLoops(d).outerVsIdeal.find((o) => o.outer === 'cut-position')!;
    expect(pair).toBeDefined();
    expect(pair.ideal.gainCrossover!).toBeCloseTo(k, 6);
    expect(pair.ideal.phaseMarginDeg!).toBeCloseTo(90 - (k * theta * 180) / Math.PI, 4);
    expect(pair.ideal.gainMargin!).toBeCloseTo(Math.PI / (2 * k * theta), 3);
    expect(pair.ideal.closedLoopStable).toBe(true);
  });
});
