/**
 * Unit tests of the analysis layer that runs without a browser: slider mapping, locus-plane
 * geometry, the engine computations the worker runs (against textbook closed forms), the CSV
 * and report exports, the comparison table.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { demoDiagrams, type Diagram } from '@loopwright/graph';
import { positionToValue, valueToPosition, sweepChoices, asSweepDiagram, engineParameterName, documentValue, fmt } from './sweep.ts';
import { dampingOf, nearestOnBranches, planeWindow, toPixel, fromPixel, niceStep, activePoints, zoomWindow, zoomAt } from './locus-geometry.ts';
import { computeAnalysis, computeLoops, computeResponse, automaticEnd } from '../worker/compute.ts';
import { responseCsv } from './export.ts';
import { designReportHtml, SAFETY_CAUTION } from './report.ts';
import { differences, dominantPole } from './compare.ts';
import { takeSnapshot } from './snapshot.ts';

/** r → step → sum(+ −) → gain K → plant 1/(s(s+2)) → probe, unity feedback, a cut on the feedback wire. */
function unityLoop(K: number, plant = '1/(s*(s + 2))'): Diagram {
  return {
    format: 'loopwright.diagram',
    version: 2,
    title: 'unity loop',
    description: '',
    parameters: [{ name: 'K', value: K, min: 0.1, max: 10, scale: 'log' }],
    blocks: [
      { id: 'r', kind: 'source', position: { x: 0, y: 0 }, params: { shape: 'step', amplitude: 1, start: 0, offset: 0, omega: 1, width: 1, period: 2 } },
      { id: 'e', kind: 'summing-junction', position: { x: 150, y: 0 }, params: { signs: '+-' } },
      { id: 'k', kind: 'gain', position: { x: 250, y: 0 }, params: { k: 'K' } },
      { id: 'g', kind: 'transfer-function', position: { x: 400, y: 0 }, params: { expression: plant } },
      { id: 'y', kind: 'probe', position: { x: 550, y: 0 }, params: {} },
    ],
    wires: [
      { id: 'w1', from: { block: 'r', port: 'out' }, to: { block: 'e', port: 'in1' } },
      { id: 'w2', from: { block: 'e', port: 'out' }, to: { block: 'k', port: 'in' } },
      { id: 'w3', from: { block: 'k', port: 'out' }, to: { block: 'g', port: 'in' } },
      { id: 'w4', from: { block: 'g', port: 'out' }, to: { block: 'y', port: 'in' } },
      { id: 'w5', from: { block: 'g', port: 'out' }, to: { block: 'e', port: 'in2' } },
    ],
    cuts: [{ id: 'c1', wire: 'w5', label: 'loop' }],
    sweeps: [],
    view: {},
  };
}

const sweepOf = (K: number) => ({ parameter: 'K', value: K, negative: false, min: 0.1, max: 10 });

describe('slider mapping', () => {
  it('log and linear ranges map ends to ends and round-trip (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-3, max: 1e3, noNaN: true }), fc.double({ min: 1.01, max: 1e4, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (a, ratio, p) => {
        for (const scale of ['log', 'linear'] as const) {
          const r = { min: a, max: a * ratio, scale };
          expect(positionToValue(r, 0)).toBeCloseTo(r.min, 9);
          expect(positionToValue(r, 1) / r.max).toBeCloseTo(1, 9);
          expect(valueToPosition(r, positionToValue(r, p))).toBeCloseTo(p, 9);
        }
      }),
      { numRuns: 200 },
    );
  });
  it('a log slider puts the geometric mean in the middle (definition of a log scale)', () => {
    expect(positionToValue({ min: 1, max: 100, scale: 'log' }, 0.5)).toBeCloseTo(10, 12);
    expect(positionToValue({ min: -100, max: -1, scale: 'log' }, 0.5)).toBeCloseTo(-10, 12);
    // A range through zero cannot be logarithmic: linear instead.
    expect(positionToValue({ min: -1, max: 3, scale: 'log' }, 0.5)).toBeCloseTo(1, 12);
  });
  it('readouts keep 4 significant digits', () => {
    expect(fmt(123.456)).toBe('123.5');
    expect(fmt(null)).toBe('—');
    expect(fmt(1.5e-5)).toBe('1.500e-5');
  });
});

describe('sweep targets', () => {
  it('lists named parameters and numeric gain blocks; a gain block becomes a synthetic parameter', () => {
    const d = unityLoop(2);
    d.blocks[2].params.k = 3; // a numeric gain, no parameter
    const c = sweepChoices(d);
    expect(c.map((x) => x.key)).toEqual(['param:K', 'block:k.k']);
    const t = c[1].target;
    const e = asSweepDiagram(d, t);
    const name = engineParameterName(t);
    expect(e.parameters.find((p) => p.name === name)?.value).toBe(3);
    expect(e.blocks.find((b) => b.id === 'k')?.params.k).toBe(name);
    expect(documentValue(d, t)).toBe(3);
    // The document itself is untouched.
    expect(d.blocks[2].params.k).toBe(3);
  });
});

describe('locus plane geometry', () => {
  const box = { left: 50, top: 20, width: 400, height: 300 };
  it('the window has equal units per pixel on both axes and holds the key points', () => {
    fc.assert(
      fc.property(fc.array(fc.record({ re: fc.double({ min: -50, max: 5, noNaN: true }), im: fc.double({ min: -30, max: 30, noNaN: true }) }), { minLength: 1, maxLength: 8 }), (pts) => {
        const w = planeWindow(box, pts, []);
        expect((w.xMax - w.xMin) / box.width).toBeCloseTo((w.yMax - w.yMin) / box.height, 9);
        for (const p of pts) {
          expect(p.re).toBeGreaterThanOrEqual(w.xMin);
          expect(p.re).toBeLessThanOrEqual(w.xMax);
          expect(Math.abs(p.im)).toBeLessThanOrEqual(w.yMax);
        }
        const q = pts[0];
        const [x, y] = toPixel(w, box, q);
        const back = fromPixel(w, box, x, y);
        expect(back.re).toBeCloseTo(q.re, 9);
        expect(back.im).toBeCloseTo(q.im, 9);
      }),
      { numRuns: 100 },
    );
  });
  it('nice steps are 1, 2 or 5 × 10^n', () => {
    for (const raw of [0.013, 0.3, 7, 42, 990]) {
      const s = niceStep(raw);
      const m = s / 10 ** Math.floor(Math.log10(s) + 1e-12);
      expect([1, 2, 5, 10].some((x) => Math.abs(m - x) < 1e-9)).toBe(true);
      expect(s / raw).toBeGreaterThan(0.4);
      expect(s / raw).toBeLessThan(2.6);
    }
  });
  it('the hit on a branch is the pointer projected onto the nearest segment', () => {
    const branches = [{ re: [-4, -2, 0], im: [0, 0, 0], k: [0, 1, 2] }];
    const w = planeWindow(box, [{ re: -4, im: 0 }, { re: 0, im: 0 }], []);
    const [x, y] = toPixel(w, box, { re: -3, im: 0 });
    const hit = nearestOnBranches(branches, w, box, x, y - 4, 10)!;
    expect(hit.s.re).toBeCloseTo(-3, 9);
    expect(hit.s.im).toBeCloseTo(0, 9);
    expect(hit.k).toBeCloseTo(0.5, 9);
    expect(nearestOnBranches(branches, w, box, x, y - 40, 10)).toBeNull();
  });
  it('damping ratio and natural frequency of s = −ζωn ± jωn√(1−ζ²) (second-order pole, textbook definition)', () => {
    const zeta = 0.3;
    const wn = 5;
    const d = dampingOf({ re: -zeta * wn, im: wn * Math.sqrt(1 - zeta * zeta) });
    expect(d.zeta).toBeCloseTo(zeta, 12);
    expect(d.omegaN).toBeCloseTo(wn, 12);
  });
  it('only branches that move over the slider range frame the window; wheel zoom keeps the pointed point fixed', () => {
    const still = { re: [-1000, -1000.001], im: [0, 0], k: [1, 2] };
    const moving = { re: [-1, -3], im: [0, 2], k: [1, 2] };
    expect(activePoints([still, moving], 1, 2)).toHaveLength(2);
    const w = planeWindow(box, [{ re: -3, im: 2 }], []);
    const z = zoomAt(w, w, box, 200, 100, 0.5, null);
    const w2 = zoomWindow(w, z);
    const before = fromPixel(w, box, 200, 100);
    const after = fromPixel(w2, box, 200, 100);
    expect(after.re).toBeCloseTo(before.re, 9);
    expect(after.im).toBeCloseTo(before.im, 9);
    expect((w2.xMax - w2.xMin) / (w.xMax - w.xMin)).toBeCloseTo(0.5, 12);
  });
});

describe('engine computations (what the worker runs)', () => {
  it('closed-loop poles of K/(s(s+2)) with unity feedback are −1 ± √(1−K) (characteristic equation s² + 2s + K = 0)', () => {
    for (const K of [0.5, 4]) {
      const r = computeAnalysis({ channel: 'analysis', id: 1, diagram: unityLoop(K), sweep: sweepOf(K), cutId: 'c1', frequency: true });
      expect(r.poles.ok).toBe(true);
      const poles = r.poles.ok ? [...r.poles.value].sort((a, b) => a.re - b.re || a.im - b.im) : [];
      const disc = 1 - K;
      const want = disc >= 0 ? [{ re: -1 - Math.sqrt(disc), im: 0 }, { re: -1 + Math.sqrt(disc), im: 0 }] : [{ re: -1, im: -Math.sqrt(-disc) }, { re: -1, im: Math.sqrt(-disc) }];
      poles.forEach((p, i) => {
        expect(p.re).toBeCloseTo(want[i].re, 8);
        expect(p.im).toBeCloseTo(want[i].im, 8);
      });
    }
  });
  it('the locus of K/(s(s+2)) is exact with its breakaway at s = −1, K = 1 (Ogata, root-locus rules, from memory)', () => {
    const res = computeAnalysis({ channel: 'analysis', id: 1, diagram: unityLoop(2), sweep: sweepOf(2), cutId: 'c1', frequency: true });
    expect(res.locus?.ok).toBe(true);
    const L = res.locus!.ok ? res.locus!.value : null;
    expect(L!.mode).toBe('exact');
    expect(L!.breakaways).toHaveLength(1);
    expect(L!.breakaways[0].s.re).toBeCloseTo(-1, 8);
    expect(L!.breakaways[0].gain).toBeCloseTo(1, 8);
    expect(L!.asymptotes!.centroid).toBeCloseTo(-1, 10);
    // The dense trace covers the slider range only.
    for (const b of L!.rangeBranches!) for (const k of b.k) {
      expect(k).toBeGreaterThanOrEqual(0.1 - 1e-12);
      expect(k).toBeLessThanOrEqual(10 + 1e-9);
    }
  });
  it('margins at the cut: |L(jωc)| = 1 at ωc² = −2 + √20 and PM = 90° − atan(ωc/2) for L = 4/(s(s+2)) (closed form)', () => {
    const r = computeAnalysis({ channel: 'analysis', id: 1, diagram: unityLoop(4), sweep: sweepOf(4), cutId: 'c1', frequency: true });
    expect(r.frequency?.ok).toBe(true);
    const f = r.frequency!.ok ? r.frequency!.value : null;
    const wc = Math.sqrt(-2 + Math.sqrt(20));
    expect(f!.margins.gainCrossover).toBeCloseTo(wc, 6);
    expect(f!.margins.phaseMarginDeg).toBeCloseTo(90 - (Math.atan(wc / 2) * 180) / Math.PI, 5);
    expect(f!.margins.gainMarginDb).toBeNull(); // a second-order loop never reaches −180°
    // |S| = 1/|1 + L| and |T| = |L|/|1 + L| (definitions of S and T).
    for (let i = 0; i < f!.omega.length; i += 50) {
      const one = Math.hypot(1 + f!.re[i], f!.im[i]);
      expect(10 ** (f!.sensDb[i] / 20) * one).toBeCloseTo(1, 9);
      expect(10 ** (f!.compDb[i] / 20)).toBeCloseTo(Math.hypot(f!.re[i], f!.im[i]) / one, 9);
    }
  });
  it('the loops table matches the frequency view at the same cut', () => {
    const d = unityLoop(4);
    const a = computeAnalysis({ channel: 'analysis', id: 1, diagram: d, sweep: sweepOf(4), cutId: 'c1', frequency: true });
    const l = computeLoops({ channel: 'loops', id: 1, diagram: d, overrides: { K: 4 } });
    expect(l.loops.ok).toBe(true);
    const row = l.loops.ok ? l.loops.value.rows[0] : null;
    const f = a.frequency!.ok ? a.frequency!.value : null;
    expect(row!.cutId).toBe('c1');
    expect(row!.margins.phaseMarginDeg).toBeCloseTo(f!.margins.phaseMarginDeg!, 9);
  });
  it('the linear step response of 4/(s(s+2)) in unity feedback matches the underdamped second-order formula (ωn = 2, ζ = 0.5)', () => {
    const d = unityLoop(4);
    const r = computeResponse({ channel: 'response', id: 1, diagram: d, overrides: { K: 4 }, until: 8 });
    const wn = 2;
    const zeta = 0.5;
    const wd = wn * Math.sqrt(1 - zeta * zeta);
    const phi = Math.acos(zeta);
    const exact = (t: number) => 1 - (Math.exp(-zeta * wn * t) / Math.sqrt(1 - zeta * zeta)) * Math.sin(wd * t + phi);
    const { time, traces } = r.linear;
    for (let i = 0; i < time.length; i += 25) expect(traces.y[i]).toBeCloseTo(exact(time[i]), 3);
    // No nonlinearity in this diagram: both runs agree.
    for (let i = 0; i < time.length; i += 25) expect(r.nonlinear.traces.y[i]).toBeCloseTo(traces.y[i], 3);
    // Overshoot exp(−πζ/√(1−ζ²)) = 16.3 % (second-order formula).
    const os = r.metrics.find((m) => m.probe === 'y')!.overshootPct!;
    expect(os).toBeCloseTo(100 * Math.exp((-Math.PI * zeta) / Math.sqrt(1 - zeta * zeta)), 0);
    expect(r.until).toBe(8);
  });
  it('sweeping a gain block (numeric k) is the same exact locus as sweeping a parameter that sets it', () => {
    const byParam = unityLoop(3);
    const byBlock = unityLoop(3);
    byBlock.parameters = [];
    byBlock.blocks[2].params.k = 3;
    const choice = sweepChoices(byBlock).find((c) => c.target.kind === 'block')!;
    const d = asSweepDiagram(byBlock, choice.target);
    const name = engineParameterName(choice.target);
    const a = computeAnalysis({ channel: 'analysis', id: 1, diagram: d, sweep: { parameter: name, value: 5, negative: false, min: 0.3, max: 30 }, cutId: null, frequency: false });
    const b = computeAnalysis({ channel: 'analysis', id: 1, diagram: byParam, sweep: { parameter: 'K', value: 5, negative: false, min: 0.3, max: 30 }, cutId: null, frequency: false });
    expect(a.locus?.ok && a.locus.value.mode).toBe('exact');
    const sort = (p: { re: number; im: number }[]) => [...p].sort((x, y) => x.im - y.im);
    const pa = sort(a.poles.ok ? a.poles.value : []);
    const pb = sort(b.poles.ok ? b.poles.value : []);
    expect(pa).toHaveLength(2);
    pa.forEach((p, i) => {
      expect(p.re).toBeCloseTo(pb[i].re, 9);
      expect(p.im).toBeCloseTo(pb[i].im, 9);
    });
    // s² + 2s + 5 = 0: −1 ± 2j.
    expect(Math.abs(pa[0].im)).toBeCloseTo(2, 9);
  });
  it('an automatic run length covers several time constants of the slowest pole', () => {
    const T = automaticEnd(unityLoop(0.5), { K: 0.5 });
    // Slowest pole −1 + √0.5 ≈ −0.293: 6 time constants ≈ 20.5 s, rounded up to 50 (1-2-5 series).
    expect(T).toBeGreaterThanOrEqual(6 / (1 - Math.sqrt(0.5)));
  });
  it('the demos compute without errors in every part', () => {
    for (const demo of demoDiagrams) {
      const d = demo.diagram;
      const sw = d.sweeps[0];
      const v = d.parameters.find((p) => p.name === sw.parameter)!.value;
      const a = computeAnalysis({ channel: 'analysis', id: 1, diagram: d, sweep: { parameter: sw.parameter, value: v, negative: true, min: sw.min, max: sw.max }, cutId: null, frequency: true });
      expect(a.locus?.ok, JSON.stringify(a.locus)).toBe(true);
      expect(a.poles.ok).toBe(true);
      expect(a.frequency?.ok).toBe(true);
      const l = computeLoops({ channel: 'loops', id: 1, diagram: d, overrides: {} });
      expect(l.loops.ok).toBe(true);
    }
  });
});

describe('exports', () => {
  const d = unityLoop(4);
  const response = computeResponse({ channel: 'response', id: 1, diagram: d, overrides: {}, until: 5 });
  const analysis = computeAnalysis({ channel: 'analysis', id: 1, diagram: d, sweep: sweepOf(4), cutId: 'c1', frequency: true });
  const loops = computeLoops({ channel: 'loops', id: 1, diagram: d, overrides: {} }).loops;
  it('CSV: a t column, each trace with and without nonlinearities, one row per sample', () => {
    const lines = responseCsv(response).trim().split('\n');
    expect(lines[0]).toBe('t,y,y (linear)');
    expect(lines).toHaveLength(response.nonlinear.time.length + 1);
    const last = lines[lines.length - 1].split(',').map(Number);
    expect(last[0]).toBe(response.nonlinear.time.at(-1));
    expect(last[1]).toBe(response.nonlinear.traces.y.at(-1));
  });
  it('the report is one self-contained HTML file with the caution, the parameters, the loops and the charts', () => {
    const html = designReportHtml({ diagram: d, sweepLabel: 'K', sweepValue: 4, analysis, loops, response, generatedAt: new Date(0) });
    expect(html).toContain(SAFETY_CAUTION.slice(0, 40));
    expect(html).toMatch(/functional-safety standards/);
    expect(html).toContain('<td>K</td>');
    expect(html).toMatch(/<h2>Loops<\/h2>/);
    expect((html.match(/<svg/g) ?? []).length).toBeGreaterThanOrEqual(5);
    expect(html).not.toMatch(/<script|(src|href)="https?:/); // self-contained (SVG namespaces are names, not fetches)
  });
  it('the comparison lists what changed between a pinned and a current result', () => {
    const a2 = computeAnalysis({ channel: 'analysis', id: 2, diagram: unityLoop(8), sweep: sweepOf(8), cutId: 'c1', frequency: true });
    const l2 = computeLoops({ channel: 'loops', id: 2, diagram: unityLoop(8), overrides: {} }).loops;
    const pinned = takeSnapshot('pinned', { K: 4 }, analysis, loops, null);
    const now = takeSnapshot('now', { K: 8 }, a2, l2, null);
    const rows = differences(pinned, now);
    expect(rows.find((r) => r.item === 'K')).toMatchObject({ pinned: 4, current: 8 });
    const pm = rows.find((r) => r.quantity === 'phase margin [°]')!;
    expect(pm.current!).toBeLessThan(pm.pinned!); // more gain, less phase margin on 1/(s(s+2))
    expect(dominantPole(now.poles)!.re).toBeCloseTo(-1, 8); // s² + 2s + 8: −1 ± j√7
  });
});
