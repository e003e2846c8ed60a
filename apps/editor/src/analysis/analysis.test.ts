/**
 * Unit tests of the editor's analysis layer that run without a browser: locus-plane geometry,
 * the worker's compute entry (it runs study requests and nothing else), the CSV export, the
 * comparison table. The analyses and the report are tested in packages/study. The analyses themselves are tested in packages/study.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { demoDiagrams } from '@loopwright/graph';
import { runStudy, type FrequencyData, type LoopsData, type PolesData, type ResponseResult } from '@loopwright/study';
import {
  dampingOf,
  nearestOnBranches,
  planeWindow,
  toPixel,
  fromPixel,
  niceStep,
  activePoints,
  zoomWindow,
  zoomAt,
} from './locus-geometry.ts';
import { computeReply } from '../worker/compute.ts';
import { channelStudies, closedLoopPoints, pinnedRunStudy, refOf, type AnalysisInputs } from './driver.ts';
import { fmtLogTick, resolveSweep } from './sweep.ts';
import { responseCsv } from './export.ts';
import { comparableRun, differences, dominantPole, runsDiffer } from './compare.ts';
import { takeSnapshot } from './snapshot.ts';
import type { AnalysisResult } from './results-store.ts';
// Test-only builders of the study package (not its public API).
import { furnaceCascade, unityLoop } from '@loopwright/study/testing';

const K = { kind: 'parameter', name: 'K' } as const;

/** What the analysis channel shows for a diagram at K (locus, poles, frequency at the cut). */
function analysisAt(Kv: number): AnalysisResult {
  const d = unityLoop(Kv);
  const live = { target: K, value: Kv };
  const f = runStudy(d, { kind: 'cut', cut: 'c1', live }) as FrequencyData;
  return {
    locus: { ok: true, value: runStudy(d, { kind: 'locus', target: K, value: Kv }) },
    poles: { ok: true, value: runStudy(d, { kind: 'poles', live }) as PolesData },
    frequency: { ok: true, value: f },
    elapsedMs: 0,
  };
}

describe('locus plane geometry', () => {
  const box = { left: 50, top: 20, width: 400, height: 300 };
  it('the window has equal units per pixel on both axes and holds the key points', () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ re: fc.double({ min: -50, max: 5, noNaN: true }), im: fc.double({ min: -30, max: 30, noNaN: true }) }), {
          minLength: 1,
          maxLength: 8,
        }),
        (pts) => {
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
        },
      ),
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
    const w = planeWindow(
      box,
      [
        { re: -4, im: 0 },
        { re: 0, im: 0 },
      ],
      [],
    );
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

describe('the worker compute entry', () => {
  it('answers one part per study request, in order, each failing on its own', () => {
    const reply = computeReply({
      channel: 'analysis',
      id: 7,
      diagram: unityLoop(2),
      studies: [{ kind: 'poles' }, { kind: 'cut', cut: 'nope' }, { kind: 'loops' }],
    });
    expect(reply.ok && reply.id === 7).toBe(true);
    const results = reply.ok ? reply.results : [];
    expect(results.map((r) => r.ok)).toEqual([true, false, true]);
    expect(results[1].ok ? null : results[1].error).toMatch(/cut nope is not in the diagram/);
  });
  it('the demos compute without errors in every part the views ask for', () => {
    for (const demo of demoDiagrams) {
      const d = demo.diagram;
      const sweep = resolveSweep(d, { key: null, liveValue: null });
      const inp: AnalysisInputs = { diagram: d, sweep, live: sweep.live, cutId: null, closedLoop: null };
      const studies = channelStudies(inp, { frequency: true, opposite: true });
      for (const [channel, reqs] of Object.entries(studies)) {
        if (channel === 'response') continue; // simulated in the agreement test
        const reply = computeReply({ channel: channel as 'analysis', id: 1, diagram: d, studies: reqs });
        expect(reply.ok).toBe(true);
        if (reply.ok) for (const r of reply.results) expect(r.ok, `${demo.id} ${channel}: ${JSON.stringify(r).slice(0, 300)}`).toBe(true);
      }
    }
  });
});

describe('exports', () => {
  const d = unityLoop(4);
  const response = runStudy(d, { kind: 'run', until: 5, linearOverlay: true }) as ResponseResult;
  const analysis = analysisAt(4);
  const loops = { ok: true as const, value: runStudy(d, { kind: 'loops' }) as LoopsData };
  it('CSV: a t column, each trace with and without nonlinearities, one row per sample', () => {
    const lines = responseCsv(response).trim().split('\n');
    expect(lines[0]).toBe('t,y,y (linear)');
    expect(lines).toHaveLength(response.run.time.length + 1);
    const last = lines[lines.length - 1].split(',').map(Number);
    expect(last[0]).toBe(response.run.time.at(-1));
    expect(last[1]).toBe(response.run.traces.y.at(-1));
  });
  it('the comparison lists what changed between a pinned and a current result', () => {
    const a2 = analysisAt(8);
    const l2 = { ok: true as const, value: runStudy(unityLoop(8), { kind: 'loops' }) as LoopsData };
    const pinned = takeSnapshot('pinned', { diagram: d, live: null }, { K: 4 }, analysis, loops, null);
    const now = takeSnapshot('now', { diagram: unityLoop(8), live: null }, { K: 8 }, a2, l2, null);
    const rows = differences(pinned, now, null);
    expect(rows.find((r) => r.item === 'K')).toMatchObject({ pinned: 4, current: 8 });
    const pm = rows.find((r) => r.quantity === 'phase margin [°]')!;
    expect(pm.current!).toBeLessThan(pm.pinned!); // more gain, less phase margin on 1/(s(s+2))
    expect(dominantPole(now.poles)!.re).toBeCloseTo(-1, 8); // s² + 2s + 8: −1 ± j√7
  });
});

describe('log frequency axis ticks', () => {
  it('decades beyond 1000 or below 0.01 are written 1e5, 1e-3; the everyday range and non-decades as the readouts write them', () => {
    expect([1e4, 1e5, 1e7, 1e-3, 1e-5].map(fmtLogTick)).toEqual(['1e4', '1e5', '1e7', '1e-3', '1e-5']);
    expect([0.01, 0.1, 1, 10, 100, 1000].map(fmtLogTick)).toEqual(['0.01', '0.1', '1', '10', '100', '1000']);
    expect(fmtLogTick(2.5e5)).toBe('2.5e5');
    expect(fmtLogTick(2510)).toBe('2500');
  });
});

describe('Compare lists each loop by the reading to act on', () => {
  it('an enclosed loop by its inner-first margins (named so), the outermost with every other loop closed', () => {
    const d = furnaceCascade();
    const loops = runStudy(d, { kind: 'loops' }) as LoopsData;
    const snap = takeSnapshot('p', { diagram: d, live: null }, {}, null, { ok: true, value: loops }, null);
    const rows = differences(snap, snap, null).filter((r) => r.group === 'loop' && r.quantity === 'phase margin [°]');
    expect(rows).toHaveLength(loops.rows.length);
    const enclosed = loops.rows.filter((r) => r.alone !== null);
    expect(enclosed.length).toBeGreaterThan(0);
    for (const r of loops.rows) {
      const inner = r.advice.actOn === 'inner-first';
      const row = rows.find((x) => x.item === (inner ? `${r.label} (inner-first)` : r.label))!;
      expect(row.pinned).toBe(inner ? r.alone!.margins.phaseMarginDeg : r.margins.phaseMarginDeg);
    }
  });
});

describe('Compare re-runs the pinned design under the current settings', () => {
  const d = unityLoop(4);
  const at = (end: number) => runStudy({ ...d, simulation: { end } }, { kind: 'run' }) as ResponseResult;
  it("the pinned design is re-run with the current run's end time and tolerances (whatever decided them), with its own diagram and held value", () => {
    const pinnedDiagram = unityLoop(2);
    const snap = takeSnapshot('p', { diagram: pinnedDiagram, live: { target: K, value: 2 } }, { K: 2 }, null, null, at(0.15));
    const current = at(0.4);
    const r = pinnedRunStudy(snap, current);
    expect(r.diagram).toBe(pinnedDiagram);
    expect(r.study).toMatchObject({
      kind: 'run',
      live: { target: K, value: 2 },
      until: 0.4,
      rtol: current.settings.rtol,
      atol: current.settings.atol,
    });
    const rerun = runStudy(r.diagram, r.study) as ResponseResult;
    expect(runsDiffer(rerun, current)).toBeNull();
    expect(comparableRun({ ok: true, value: rerun }, current)).toBe(rerun);
  });
  it('runs of different lengths are never compared: the response rows are left out and the reason given', () => {
    const a = at(0.15);
    const b = at(0.4);
    expect(runsDiffer(a, b)).toBe('the runs end at 0.15 s and 0.4 s');
    expect(comparableRun({ ok: true, value: a }, b)).toBeNull();
    const snap = takeSnapshot('p', { diagram: d, live: null }, { K: 4 }, null, null, a);
    const now = takeSnapshot('n', { diagram: d, live: null }, { K: 4 }, null, null, b);
    expect(differences(snap, now, a).filter((r) => r.group === 'response')).toEqual([]);
    expect(differences(snap, now, at(0.4)).filter((r) => r.group === 'response').length).toBeGreaterThan(0);
  });
});

describe("the Closed loop view's points", () => {
  it('the ones picked while they exist, else the first source and the first probe', () => {
    const d = unityLoop(4);
    expect(closedLoopPoints(d, null, null)).toEqual({ from: { block: 'r' }, to: { block: 'y' } });
    expect(closedLoopPoints(d, 'wire:w2', 'block:g')).toEqual({ from: { wire: 'w2' }, to: { block: 'g' } });
    expect(closedLoopPoints(d, 'wire:gone', 'block:nope')).toEqual({ from: { block: 'r' }, to: { block: 'y' } });
    expect(refOf(d, 'nonsense')).toBeNull();
  });
});
