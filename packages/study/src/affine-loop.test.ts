/**
 * The precomputed (affine) path of a live sweep against full recomputation — two independent
 * ways to the same loops (pieces fitted once and evaluated, against a Mason reduction of the
 * whole diagram at each value) — and against closed forms of a textbook loop.
 */
import { describe, expect, it } from 'vitest';
import { demoDiagrams, type Diagram } from '@loopwright/graph';
import { threeLoopAxis } from '@loopwright/graph/testing';
import { clearCaches } from './caches.ts';
import { cutStudy } from './cuts.ts';
import { locusStudy } from './locus.ts';
import { loopsStudy } from './loops.ts';
import { polesStudy } from './poles.ts';
import { resolveSweep } from './sweep-target.ts';
import { unityLoop } from './testing.ts';
import type { Cx, LiveValue, MarginsData, SweepTarget } from './types.ts';

/** Every pole of `a` has one in `b` within tol of its size (and the counts agree): equal as sets. */
function expectSamePoles(a: Cx[], b: Cx[], tol = 1e-6) {
  expect(a.length).toBe(b.length);
  const left = [...b];
  for (const p of a) {
    let best = -1;
    let dist = Infinity;
    left.forEach((q, i) => {
      const x = Math.hypot(p.re - q.re, p.im - q.im);
      if (x < dist) [best, dist] = [i, x];
    });
    expect(dist).toBeLessThanOrEqual(tol * Math.max(1, Math.hypot(p.re, p.im)));
    left.splice(best, 1);
  }
}

const FIGURES = [
  'gainMargin',
  'phaseMarginDeg',
  'gainCrossover',
  'phaseCrossover',
  'delayMargin',
  'peakSensitivity',
  'peakComplementary',
  'bandwidth',
  'lowerGainMargin',
] as const;

/** A phase crossover with gain factor 1 to round-off: the loop on its stability boundary. */
const onBoundary = (m: MarginsData) => [m.gainMargin, m.lowerGainMargin].some((x) => x !== null && Math.abs(x - 1) < 1e-6);

function expectSameMargins(a: MarginsData, b: MarginsData, atCrossing = false) {
  // On the boundary, a factor of exactly 1 is the (upper) gain margin on one side of round-off and
  // the lower one on the other, with the next crossover's factor beside it: both must see it.
  const boundary = atCrossing && onBoundary(b);
  if (boundary) expect(onBoundary(a)).toBe(true);
  for (const f of FIGURES) {
    if (boundary && (f === 'gainMargin' || f === 'lowerGainMargin' || f === 'phaseCrossover')) continue;
    const x = a[f];
    const y = b[f];
    if (x === null || y === null || !Number.isFinite(x) || !Number.isFinite(y)) {
      // At a crossing a figure may exist on one side of round-off only (a margin of exactly 1).
      if (!atCrossing) expect([f, x]).toEqual([f, y]);
      continue;
    }
    // A peak of |S| or |T| above 10⁶ is a closed-loop pole on the jω axis to round-off (in the
    // configuration read): its size is 1/(round-off) on either path, so only that is compared.
    if (f.startsWith('peak') && (x > 1e6 || y > 1e6)) {
      expect([f, x > 1e6]).toEqual([f, y > 1e6]);
      continue;
    }
    // Phase margins near 0° are compared in absolute terms.
    const tol = f === 'phaseMarginDeg' ? 1e-5 : 1e-6 * Math.max(1, Math.abs(y));
    expect(Math.abs(x - y), `${f}: ${x} vs ${y}`).toBeLessThanOrEqual(atCrossing ? 1e-4 * Math.max(1, Math.abs(y)) : tol);
  }
  expect(a.gainCrossovers.length).toBe(b.gainCrossovers.length);
  if (!atCrossing) expect(a.closedLoopStable).toBe(b.closedLoopStable);
}

/** Fast and full loops table, every cut's frequency data and the poles at one value. */
function agreeAt(d: Diagram, target: SweepTarget, value: number, atCrossing = false) {
  const live: LiveValue = { target, value };
  const fast = loopsStudy(d, { live });
  const full = loopsStudy(d, { live, affine: false });
  // Every loop is read from pieces, dead times included (exact: tabulated where they sit inside
  // other loops), except at the document's own value, which is computed in full.
  const own = docValue(d, target) === value;
  expect(fast.sweepPath).toBe(own ? 'full' : 'affine');
  expect(full.sweepPath).toBe('full');
  expect(fast.rows.map((r) => r.cutId)).toEqual(full.rows.map((r) => r.cutId));
  fast.rows.forEach((r, i) => {
    expectSameMargins(r.margins, full.rows[i].margins, atCrossing);
    if (r.alone) expectSameMargins(r.alone.margins, full.rows[i].alone!.margins, atCrossing);
    expect(r.openLoopRhpPoles).toBe(full.rows[i].openLoopRhpPoles);
    expect(r.frequencyMethod).toEqual(full.rows[i].frequencyMethod);
    expect(r.delayHandling).toEqual(full.rows[i].delayHandling);
    expectSamePoles(r.hiddenModes, full.rows[i].hiddenModes, 1e-5);
    expect(r.loop.den.length).toBe(full.rows[i].loop.den.length);
  });
  fast.outerVsIdeal.forEach((o, i) => expectSameMargins(o.idealMargins, full.outerVsIdeal[i].idealMargins, atCrossing));
  expect(fast.separations.map((s) => s.flag)).toEqual(full.separations.map((s) => s.flag));
  expectSamePoles(fast.closedLoopPoles, full.closedLoopPoles);
  if (!atCrossing) expect(fast.stable).toBe(full.stable);
  for (const row of full.rows) {
    const a = cutStudy(d, { cut: row.cutId, live })!;
    const b = cutStudy(d, { cut: row.cutId, live, affine: false })!;
    expect(a.sweepPath).toBe(own ? 'full' : 'affine');
    expect(a.frequencyMethod).toEqual(b.frequencyMethod);
    expectSameMargins(a.margins, b.margins, atCrossing);
    expect(a.omega.length).toBe(b.omega.length);
    // The view's L(jω), exact in every dead time on both paths.
    if (!atCrossing)
      a.re.forEach((x, j) =>
        expect(Math.hypot(x - b.re[j], a.im[j] - b.im[j])).toBeLessThanOrEqual(1e-9 * Math.max(1e-300, Math.hypot(b.re[j], b.im[j]))),
      );
  }
  expectSamePoles(polesStudy(d, { live }).poles, polesStudy(d, { live, affine: false }).poles);
}

/** The document's own value of the swept quantity (computed in full, see liveReader). */
function docValue(d: Diagram, target: SweepTarget): number | undefined {
  if (target.kind === 'parameter') return d.parameters.find((p) => p.name === target.name)?.value;
  const v = d.blocks.find((b) => b.id === target.block)?.params[target.field];
  return typeof v === 'number' ? v : undefined;
}

/** Values across the slider range (log-spaced), as a drag visits them. */
function across(min: number, max: number, n: number): number[] {
  return Array.from({ length: n }, (_, i) => min * (max / min) ** (i / (n - 1)));
}

describe('a live sweep through precomputed pieces agrees with full recomputation', () => {
  for (const demo of demoDiagrams) {
    it(`${demo.id}: loops table, every cut and the poles at values across the range and beyond`, () => {
      clearCaches();
      const d = demo.diagram;
      const sweep = resolveSweep(d, { key: null, liveValue: null });
      const { min, max } = sweep.range!;
      for (const v of [...across(min, max, 6), max * 3]) agreeAt(d, sweep.choice!.target, v);
    });
  }

  for (const id of ['positioning-axis', 'heating-cascade']) {
    it(`${id} (dead times inside inner loops, L(jω) solved at s = jω): negative values and the value where the outer loop's gain margin is exactly 1`, () => {
      clearCaches();
      const demo = demoDiagrams.find((x) => x.id === id)!;
      const d = demo.diagram;
      const sweep = resolveSweep(d, { key: null, liveValue: null });
      const target = sweep.choice!.target;
      const { min, max } = sweep.range!;
      // The demos' inner loops hold dead times: the cuts are read from the diagram solved at s = jω.
      const full = loopsStudy(d, { live: { target, value: min * 1.3 }, affine: false });
      expect(full.rows.some((r) => r.frequencyMethod.solved)).toBe(true);
      for (const v of [-min, -0.2 * max, 0.7 * min]) agreeAt(d, target, v);
      // The swept gain scales the outer loop's L, so k·GM is where |L| = 1 at its phase crossover
      // (the closed loop on its stability boundary, the exact dead times deciding it).
      const k0 = min * 2.1;
      const outer = cutStudy(d, { cut: full.rows[0].cutId, live: { target, value: k0 }, affine: false })!;
      expect(outer.margins.gainMargin).not.toBeNull();
      agreeAt(d, target, k0 * outer.margins.gainMargin!, true);
    });
  }

  it('a three-loop cascade: the outer gain, the middle PID gain, negative values, and the value at a jω crossing', () => {
    clearCaches();
    const d = threeLoopAxis();
    for (const v of [5, 41, 150, -3, -40]) agreeAt(d, { kind: 'parameter', name: 'Kpos' }, v);
    for (const v of [0.05, 0.25, 0.9]) agreeAt(d, { kind: 'parameter', name: 'Kv' }, v);
    // At the gain where the locus crosses the jω axis the loop is marginally stable.
    const target: SweepTarget = { kind: 'parameter', name: 'Kpos' };
    const crossing = locusStudy(d, { target }).crossings.find((c) => c.omega > 0 && c.gain > 0);
    expect(crossing).toBeDefined();
    agreeAt(d, target, crossing!.gain, true);
  });

  it('a gain block swept by its k (the engine renames it) takes the precomputed path too', () => {
    clearCaches();
    const base = threeLoopAxis();
    const d: Diagram = { ...base, blocks: base.blocks.map((b) => (b.id === 'Cpos' ? { ...b, params: { ...b.params, k: 40 } } : b)) };
    for (const v of [20, 80, -10]) agreeAt(d, { kind: 'block', block: 'Cpos', field: 'k' }, v);
  });

  it("the document's own value is computed in full (the figures the command line prints), a held value next to it is not", () => {
    clearCaches();
    const d = threeLoopAxis(40);
    const target: SweepTarget = { kind: 'parameter', name: 'Kpos' };
    expect(loopsStudy(d, { live: { target, value: 40 } }).sweepPath).toBe('full');
    expect(cutStudy(d, { cut: null, live: { target, value: 40 } })!.sweepPath).toBe('full');
    expect(loopsStudy(d, { live: { target, value: 40.5 } }).sweepPath).toBe('affine');
  });

  it('a time constant is not affine: the results say they were recomputed in full, and agree with the request that asks for it', () => {
    clearCaches();
    const d = threeLoopAxis();
    const d2: Diagram = {
      ...d,
      parameters: [...d.parameters, { name: 'Tw', value: 0.002 }],
      blocks: d.blocks.map((b) => (b.id === 'winding' ? { ...b, params: { ...b.params, tau: 'Tw' } } : b)),
    };
    const live: LiveValue = { target: { kind: 'parameter', name: 'Tw' }, value: 0.003 };
    const fast = loopsStudy(d2, { live });
    expect(fast.sweepPath).toBe('full');
    expect(cutStudy(d2, { cut: null, live })!.sweepPath).toBe('full');
    const full = loopsStudy(d2, { live, affine: false });
    fast.rows.forEach((r, i) => expectSameMargins(r.margins, full.rows[i].margins));
  });
});

describe('the precomputed path against closed forms', () => {
  // L = k/(s(s+1)(s+2)): GM = 6/k at ω = √2 (Routh–Hurwitz, Ogata Example 6-1, from memory) [R03];
  // k = 2: GM 3, PM 32.61°; k = 4: GM 1.5, PM 11.42° [R62, derived from R03 and R21].
  const d = unityLoop(10, '1/(s*(s + 1)*(s + 2))', { min: 0.1, max: 20 });
  const target: SweepTarget = { kind: 'parameter', name: 'K' };

  it('gain margin 6/k at ω = √2 for every k, PM at k = 2 and 4 [R03, R62]', () => {
    clearCaches();
    for (const k of [0.3, 1, 2, 4, 5.5]) {
      const f = cutStudy(d, { cut: 'c1', live: { target, value: k } })!;
      expect(f.sweepPath).toBe('affine');
      expect(f.margins.gainMargin!).toBeCloseTo(6 / k, 6);
      expect(f.margins.phaseCrossover!).toBeCloseTo(Math.SQRT2, 6);
    }
    expect(cutStudy(d, { cut: 'c1', live: { target, value: 2 } })!.margins.phaseMarginDeg!).toBeCloseTo(32.61, 2);
    expect(cutStudy(d, { cut: 'c1', live: { target, value: 4 } })!.margins.phaseMarginDeg!).toBeCloseTo(11.42, 2);
  });

  it('stable for 0 < k < 6 and not above [R03]', () => {
    clearCaches();
    expect(loopsStudy(d, { live: { target, value: 5.9 } }).stable).toBe(true);
    expect(loopsStudy(d, { live: { target, value: 6.1 } }).stable).toBe(false);
    expect(loopsStudy(d, { live: { target, value: 6.1 } }).sweepPath).toBe('affine');
  });
});
