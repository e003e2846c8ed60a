import { describe, expect, it } from 'vitest';
import { type Complex, cabs, poly, polyRoots, rootSetMismatch } from '@loopwright/lti';
import { closedLoop, closedLoopPoles } from './reduce.ts';
import { closedLoopPolesStateSpace } from './state-space.ts';
import { matchRoots, sweepLocus } from './sweep.ts';
import fc from 'fast-check';
import { analyseLoops } from './loops.ts';
import { diagramOf, threeLoopAxis } from './test-diagrams.ts';

const rootError = (got: Complex[], want: Complex[]) => rootSetMismatch(got, want, 1);

describe('sweeps over a whole diagram', () => {
  it('a gain in a three-loop diagram gives an exact locus that reproduces freshly reduced poles at 20 gains', () => {
    const d = threeLoopAxis();
    const sw = sweepLocus(d, 'Kpos');
    expect(sw.mode).toBe('exact');
    if (sw.mode !== 'exact') return;
    // Independent: closed-loop poles of the diagram reduced afresh at each gain (method A) and
    // eigenvalues of the assembled state matrix (method B, ml-matrix).
    for (let i = 0; i < 20; i++) {
      const k = 1 * 400 ** (i / 19);
      const fromSweep = polyRoots(poly.add(sw.d0, poly.scale(sw.n0, k)));
      expect(rootError(fromSweep, closedLoopPoles(d, { Kpos: k }))).toBeLessThan(1e-6);
      expect(rootError(fromSweep, closedLoopPolesStateSpace(d, { Kpos: k }))).toBeLessThan(1e-6);
    }
    // The locus starts at the poles with Kpos = 0, i.e. of the diagram with the position gain
    // removed; the current PI's zero on the winding pole (−500) stays put for every gain.
    expect(sw.fixedPoles.length).toBe(1);
    expect(Math.abs(sw.fixedPoles[0].re + 500)).toBeLessThan(1e-6);
    expect(rootError([...sw.locus.poles, ...sw.fixedPoles], closedLoopPoles(d, { Kpos: 1e-300 }))).toBeLessThan(1e-6);
  });

  it('a time constant (enters a denominator) gives a sampled locus with continuous branches', () => {
    const d = diagramOf(
      [
        ['r', 'source'],
        ['e', 'summing-junction', { signs: '+-' }],
        ['C', 'gain', { k: 4 }],
        ['P', 'first-order-lag', { k: 1, tau: 'T' }],
        ['I', 'integrator', { k: 1 }],
        ['y', 'probe'],
      ],
      ['r->e.in1', 'e->C', 'C->P', 'P->I', 'fb:I->e.in2', 'I->y'],
      [{ name: 'T', value: 0.5, min: 0.05, max: 2, scale: 'log' }],
    );
    const sw = sweepLocus(d, 'T', {}, { samples: 30 });
    expect(sw.mode).toBe('sampled');
    if (sw.mode !== 'sampled') return;
    expect(sw.branches.length).toBe(2);
    // s² T + s + 4 = 0 (characteristic equation of 4/(s(Ts + 1)) closed with unity feedback).
    for (const br of sw.branches) {
      for (const { s, k } of br) {
        const v = poly.evalComplex([4, 1, k], s);
        expect(cabs(v)).toBeLessThan(1e-9 * (1 + k * cabs(s) ** 2));
      }
    }
  });
});

describe('loop interaction of a cascade', () => {
  it('every cut, separation ratios, and the outer loop with an ideal inner loop', () => {
    const d = threeLoopAxis();
    const rep = analyseLoops(d);
    expect(rep.cuts.map((c) => c.cut)).toEqual(['current', 'speed', 'position']);
    expect(rep.stable).toBe(true);
    expect(rep.separations.map((s) => [s.inner, s.outer])).toEqual([
      ['current', 'speed'],
      ['speed', 'position'],
    ]);
    // With an ideal (unity) speed loop, the position loop is Kpos/s exactly: crossover Kpos and
    // PM 90° (integrator loop, Ogata Sec. 7-6 definitions (from memory)).
    const ideal = rep.outerVsIdeal.find((o) => o.outer === 'position')!;
    expect(Math.abs(ideal.ideal.gainCrossover! - 40)).toBeLessThan(1e-6);
    expect(Math.abs(ideal.ideal.phaseMarginDeg! - 90)).toBeLessThan(1e-6);
    expect(ideal.real.phaseMarginDeg!).toBeLessThan(90);
    // Tuned inner-first (speed and position loops open), the current loop is
    // 2(1 + 1/(0.002 s))/(0.002 s + 1) = 1000/s exactly: crossover 1000 rad/s, PM 90°.
    const cur = rep.cuts.find((c) => c.cut === 'current')!;
    expect(cur.alone.opened.sort()).toEqual(['fbPos', 'fbVel']);
    expect(Math.abs(cur.alone.crossover! - 1000)).toBeLessThan(1e-6);
    expect(Math.abs(cur.alone.margins.phaseMarginDeg! - 90)).toBeLessThan(1e-6);
    // With every other loop closed the reading differs (the speed loop closes around the cut).
    expect(cur.crossover).not.toBeNull();
    for (const s of rep.separations) expect(s.ratio).toBeGreaterThan(1);
  });

  it('flags a separation below 3 (common practice, no source)', () => {
    const rep = analyseLoops(threeLoopAxis(150, 0.2));
    const sp = rep.separations.find((s) => s.outer === 'position')!;
    expect(sp.ratio!).toBeLessThan(3);
    expect(sp.flag).toBe(true);
  });

  it('proposes cuts on feedback wires when the diagram has none', () => {
    const d = { ...threeLoopAxis(), cuts: [] };
    const rep = analyseLoops(d);
    expect(rep.cuts.map((c) => c.wire).sort()).toEqual(['fbCur', 'fbPos', 'fbVel']);
    expect(rep.cuts.every((c) => c.auto)).toBe(true);
  });
});

describe('diagram reduction with catalogue blocks', () => {
  it('reference to position of the axis: type-1 loop, unit static gain; both methods agree on poles', () => {
    const d = threeLoopAxis();
    const t = closedLoop(d, { block: 'ref' }, { block: 'pos' });
    expect(Math.abs(t.staticGain - 1)).toBeLessThan(1e-9); // integrating loop: zero steady-state error (final-value theorem, Nise Sec. 7.3 (from memory))
    const a = closedLoopPoles(d);
    const b = closedLoopPolesStateSpace(d);
    expect(rootError(b, a)).toBeLessThan(1e-6);
    expect(t.poles.every((p) => p.re < 0)).toBe(true);
    // The current PI's zero −1/0.002 cancels the winding pole −1/0.002: reported as a hidden
    // mode (still a closed-loop pole of the diagram), and left out of T.
    expect(t.hiddenModes.length).toBe(1);
    expect(Math.abs(t.hiddenModes[0].re + 500)).toBeLessThan(1e-6);
    expect(a.some((p) => Math.abs(p.re + 500) < 1e-6)).toBe(true);
    expect(t.poles.length).toBe(a.length - 1);
  });
});

describe('root matching between samples', () => {
  it('recovers a shuffled, slightly moved root set (fast-check)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 8 }), fc.integer({ min: 0, max: 1000 }), (n, seed) => {
        // Roots on a spread grid (spacing 1), moved by at most 0.1 and shuffled by a known permutation.
        const prev = Array.from({ length: n }, (_, i) => ({ re: -1 - i, im: (i % 3) - 1 }));
        const perm = prev.map((_, i) => i).sort((a, b) => ((a * 7919 + seed) % 13) - ((b * 7919 + seed) % 13));
        const next = perm.map((i) => ({ re: prev[i].re + 0.05 * Math.sin(seed + i), im: prev[i].im + 0.05 * Math.cos(seed + i) }));
        const m = matchRoots(prev, next);
        prev.forEach((_, i) => expect(perm[m[i]]).toBe(i));
      }),
      { numRuns: 100 },
    );
  });
});
