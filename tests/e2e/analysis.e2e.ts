/**
 * Analysis views in the browser (playwright-core + Debian chromium, through E1's harness).
 * Chart data are read from `window.__loopwright.analysis` (what the charts were given), never
 * from pixels; pixels are only used to aim clicks and for the screenshots in test-artifacts/.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Download, Page } from 'playwright-core';
import { demoDiagrams, serializeDiagram, type Diagram } from '@loopwright/graph';
import { roundSignificant } from '@loopwright/lti';
import { openEditor, screenshot, type EditorSession } from './harness.ts';
import { analysisSettled, analysisState, loadDiagram } from './ui.ts';

const ROOT = resolve(import.meta.dirname, '..', '..');

interface Cx {
  re: number;
  im: number;
}
interface HookState {
  generation: number;
  renderedGeneration: number;
  complete: boolean;
  sweep: { key: string; label: string; value: number; live: number | null; parameter: string } | null;
  poles: Cx[] | null;
  locus: { mode: string; branches: { re: number[]; im: number[]; k: number[] }[]; poles: Cx[]; zeros: Cx[] } | null;
  frequency: { cutId: string; margins: Record<string, number | null> } | null;
  loops: { rows: { cutId: string; wire: string; margins: Record<string, number | boolean | null> }[] } | null;
  response: {
    run: { time: number[]; traces: Record<string, number[]> };
    linear: { time: number[]; traces: Record<string, number[]> } | null;
    probes: { id: string }[];
  } | null;
}

const state = (page: Page) => analysisState<HookState>(page);
const settled = (page: Page) => analysisSettled<HookState>(page);

const demo = (id: string): Diagram => {
  const d = demoDiagrams.find((x) => x.id === id);
  if (!d) throw new Error(`demo ${id} missing`);
  return JSON.parse(JSON.stringify(d.diagram)) as Diagram;
};

/** Sets the slider to a position 0..1000 with the keyboard-free input path a user's drag takes. */
async function dragSliderTo(page: Page, fraction: number) {
  const slider = page.getByTestId('sweep-slider');
  const box = (await slider.boundingBox())!;
  const y = box.y + box.height / 2;
  await page.mouse.move(box.x + 8 + (box.width - 16) * 0.5, y);
  await page.mouse.down();
  await page.mouse.move(box.x + 8 + (box.width - 16) * fraction, y, { steps: 3 });
  return {
    release: () => page.mouse.up(),
  };
}

type Branch = { re: number[]; im: number[]; k: number[] };
/** The slider-range branch (upper half-plane) that moves most relative to its size: the dominant pair. */
function dominantRangeBranch(st: HookState): Branch {
  const range = (st.locus as unknown as { rangeBranches: Branch[] }).rangeBranches;
  return range
    .map((b) => ({
      b,
      span: Math.hypot(b.re[b.re.length - 1] - b.re[0], b.im[b.im.length - 1] - b.im[0]) / Math.max(1, Math.hypot(b.re[0], b.im[0])),
    }))
    .filter((x) => Math.max(...x.b.im) > 0)
    .sort((a, b) => b.span - a.span)[0].b;
}

const locusPagePoint = (page: Page, p: Cx) =>
  page.evaluate(
    ([re, im]) =>
      (
        window as unknown as { __loopwright: { analysis: { locusPagePoint(a: number, b: number): { x: number; y: number } } } }
      ).__loopwright.analysis.locusPagePoint(re, im),
    [p.re, p.im],
  );

/** RFC 4180 fields of one CSV line (quoted fields may hold commas and doubled quotes). */
function csvFields(line: string): string[] {
  const out: string[] = [];
  let cur = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (quoted) {
      if (ch === '"' && line[i + 1] === '"') {
        cur += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else cur += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') {
      out.push(cur);
      cur = '';
    } else cur += ch;
  }
  out.push(cur);
  return out;
}

const dist = (a: Cx, b: Cx) => Math.hypot(a.re - b.re, a.im - b.im);
const sortPoles = (p: Cx[]) => [...p].sort((a, b) => a.re - b.re || a.im - b.im);

/** PNG: 8-byte signature, then the IHDR chunk with width and height (PNG spec, ISO/IEC 15948 §5.2, §11.2.2). */
function pngSize(buf: Buffer): { width: number; height: number } {
  const sig = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
  sig.forEach((b, i) => expect(buf[i], `PNG signature byte ${i}`).toBe(b));
  expect(buf.subarray(12, 16).toString('ascii')).toBe('IHDR');
  return { width: buf.readUInt32BE(16), height: buf.readUInt32BE(20) };
}

describe('analysis views', () => {
  let s: EditorSession;
  let page: Page;
  const downloads = mkdtempSync(join(tmpdir(), 'loopwright-analysis-dl-'));

  beforeAll(async () => {
    s = await openEditor({ width: 1440, height: 900 });
    page = s.page;
    await loadDiagram(page, demo('positioning-axis'));
    await settled(page);
  });
  afterAll(async () => {
    await s?.close();
    rmSync(downloads, { recursive: true, force: true });
  });

  it('moving the slider moves the closed-loop poles along the branches and changes the response', async () => {
    const s0 = await settled(page);
    expect(s0.sweep?.parameter).toBe('Kp_pos');
    expect(s0.locus?.mode).toBe('exact');
    const probe = s0.response!.probes[0].id;
    const y0 = s0.response!.run.traces[probe];
    // The poles as the Locus chart was given them (not the hook's copy of the results).
    const chartPoles = async () => {
      const opt = (await page.evaluate(() =>
        (window as unknown as { __loopwright: { analysis: { chartOption(n: string): unknown } } }).__loopwright.analysis.chartOption(
          'locus',
        ),
      )) as {
        series: { name: string; data: number[][] }[];
      };
      // Poles that belong to a Padé approximant are drawn apart (hollow), in a series of their own.
      return opt.series
        .filter((x) => x.name === 'closed-loop poles' || x.name === 'poles of a Padé approximant')
        .flatMap((x) => x.data.map(([re, im]) => ({ re, im })));
    };
    const p0 = await chartPoles();
    expect(sortPoles(p0)).toEqual(sortPoles(s0.poles!));

    const drag = await dragSliderTo(page, 0.85);
    const s1 = await settled(page);
    expect(s1.sweep!.live, 'the slider value is live, not yet in the document').not.toBeNull();
    const v1 = s1.sweep!.value;
    expect(v1).toBeGreaterThan(s0.sweep!.value * 1.5);
    // The drag's steps ask for the locus once and keep it (the same sign, the same locus).
    expect(s1.locus).toEqual(s0.locus);
    const p1 = await chartPoles();
    expect(sortPoles(p1)).toEqual(sortPoles(s1.poles!));
    // The poles are drawn on the chart's mark layer (not through its option): a mark where the
    // chart maps each pole that lies inside the drawing area, and none for poles outside it.
    const drawn = await page.evaluate(() => {
      const h = (
        window as unknown as {
          __loopwright: {
            analysis: {
              markPoints(n: string): { id: string; x: number; y: number }[];
              locusPagePoint(re: number, im: number): { x: number; y: number } | null;
            };
          };
        }
      ).__loopwright.analysis;
      return { marks: h.markPoints('locus'), box: document.querySelector('[data-chart="locus"]')!.getBoundingClientRect().toJSON() };
    });
    const inside: { x: number; y: number }[] = [];
    for (const p of p1) {
      const at = await page.evaluate(
        ([re, im]) =>
          (
            window as unknown as { __loopwright: { analysis: { locusPagePoint(re: number, im: number): { x: number; y: number } | null } } }
          ).__loopwright.analysis.locusPagePoint(re, im),
        [p.re, p.im],
      );
      if (at && at.x > drawn.box.left && at.x < drawn.box.right && at.y > drawn.box.top && at.y < drawn.box.bottom) inside.push(at);
    }
    const poleMarks = drawn.marks.filter((m) => m.id !== 'hover');
    expect(inside.length).toBeGreaterThan(0);
    expect(poleMarks.length).toBeLessThanOrEqual(p1.length);
    for (const at of inside) expect(Math.min(...poleMarks.map((m) => Math.hypot(m.x - at.x, m.y - at.y)))).toBeLessThan(1);
    // Some pole moved by more than 1 % of its size…
    const moved = p1.filter((p) => Math.min(...p0.map((q) => dist(p, q))) > 0.01 * Math.hypot(p.re, p.im));
    expect(moved.length).toBeGreaterThan(0);
    // …and every pole lies on a branch of the locus drawn (within 1 % of its modulus): the
    // nearest point of the traced polylines, segment by segment — or is one of the fixed poles
    // (common to N0 and D0: closed-loop poles the sweep does not move, drawn as poles).
    const branches = [...s1.locus!.branches, ...((s1.locus as unknown as { rangeBranches: Branch[] | null }).rangeBranches ?? [])];
    const fixed = (s1.locus as unknown as { fixedPoles: Cx[] }).fixedPoles;
    const toBranches = (p: Cx) => {
      let best = Math.min(Infinity, ...fixed.map((q) => dist(p, q)));
      for (const b of branches) {
        for (let i = 0; i + 1 < b.re.length; i++) {
          const ax = b.re[i],
            ay = b.im[i],
            dx = b.re[i + 1] - ax,
            dy = b.im[i + 1] - ay;
          const l2 = dx * dx + dy * dy;
          const t = l2 > 0 ? Math.max(0, Math.min(1, ((p.re - ax) * dx + (p.im - ay) * dy) / l2)) : 0;
          best = Math.min(best, Math.hypot(ax + t * dx - p.re, ay + t * dy - p.im));
        }
      }
      return best;
    };
    for (const p of p1) expect(toBranches(p), `pole ${p.re} ${p.im} on a branch`).toBeLessThan(0.01 * Math.max(1, Math.hypot(p.re, p.im)));
    // The response changed with it.
    const y1 = s1.response!.run.traces[probe];
    const diff = Math.max(...y1.map((v, i) => Math.abs(v - (y0[i] ?? v))));
    const scale = Math.max(...y0.map(Math.abs));
    expect(diff).toBeGreaterThan(0.01 * scale);
    // Releasing commits the value to the document (one undoable edit).
    const before = await page.evaluate(
      () => (window as unknown as { __loopwright: { historySize(): { past: number } } }).__loopwright.historySize().past,
    );
    await drag.release();
    await expect.poll(async () => (await state(page)).sweep!.live).toBeNull();
    const doc = await page.evaluate(() => (window as unknown as { __loopwright: { getDiagram(): Diagram } }).__loopwright.getDiagram());
    // Written rounded to 4 significant digits (issue 11 item 7), the rounding the shared lti routine does.
    expect(doc.parameters.find((p) => p.name === 'Kp_pos')!.value).toBe(roundSignificant(v1, 4));
    expect(String(doc.parameters.find((p) => p.name === 'Kp_pos')!.value).replace(/^0\.0*|[.-]|e.*$/g, '').length).toBeLessThanOrEqual(4);
    const after = await page.evaluate(
      () => (window as unknown as { __loopwright: { historySize(): { past: number } } }).__loopwright.historySize().past,
    );
    expect(after).toBe(before + 1);
  });

  it('a drag draws the response on its live layer in held axes, then gives the charts their data back', async () => {
    type Hook = {
      liveTraces(n: string): boolean;
      chartOption(n: string): { series: { name: string; data: number[][] }[] } | null;
      yExtents(n: string): [number, number][] | null;
      latencies(): number[];
    };
    const live = (name: string) =>
      page.evaluate((n) => (window as unknown as { __loopwright: { analysis: Hook } }).__loopwright.analysis.liveTraces(n), name);
    const shownOf = (name: string) =>
      page.evaluate((n) => (window as unknown as { __loopwright: { analysis: Hook } }).__loopwright.analysis.chartOption(n), name);
    const drawnCount = () =>
      page.evaluate(() => (window as unknown as { __loopwright: { analysis: Hook } }).__loopwright.analysis.latencies().length);
    await settled(page);
    const slider = page.getByTestId('sweep-slider');
    const box = (await slider.boundingBox())!;
    const y = box.y + box.height / 2;
    const x = (f: number) => box.x + 8 + (box.width - 16) * f;
    await page.mouse.move(x(0.5), y);
    await page.mouse.down();
    // steps of a drag, each drawn before the next (well inside the stream's 400 ms)
    for (const f of [0.52, 0.55, 0.58, 0.6]) {
      const n = await drawnCount();
      await page.mouse.move(x(f), y);
      await expect.poll(drawnCount, { timeout: 10_000 }).toBeGreaterThan(n);
    }
    expect(await live('response')).toBe(true);
    const s1 = await state(page);
    // what the chart shows is the run just computed, in axes that hold it
    const shown = (await shownOf('response'))!;
    const probe = s1.response!.probes[0].id;
    const first = shown.series[0].data as unknown as number[][];
    expect(first.length).toBe(s1.response!.run.time.length);
    expect(first[first.length - 1][1]).toBe(s1.response!.run.traces[probe][s1.response!.run.time.length - 1]);
    const held = (await page.evaluate(() =>
      (window as unknown as { __loopwright: { analysis: Hook } }).__loopwright.analysis.yExtents('response'),
    ))!;
    const ys = s1.response!.run.traces[probe];
    expect(held[0][0]).toBeLessThanOrEqual(Math.min(...ys));
    expect(held[0][1]).toBeGreaterThanOrEqual(Math.max(...ys));
    await screenshot(page, 'analysis-drag-live-traces');
    // a pause: the charts hold their data again, their axes fitted by ECharts
    await expect.poll(() => live('response'), { timeout: 5_000 }).toBe(false);
    expect(await live('actuator')).toBe(false);
    const after = (await shownOf('response'))!;
    expect(after.series[0].data).toEqual(first);
    await page.mouse.up();
    await expect.poll(async () => (await state(page)).sweep!.live).toBeNull();
  });

  it('clicking a branch point sets the gain that puts a closed-loop pole within 1 % of it', async () => {
    const s0 = await settled(page);
    const moving = dominantRangeBranch(s0);
    const picks = [0.3, 0.7].map((f) => Math.round(f * (moving.re.length - 1)));
    for (const i of picks) {
      const target = { re: moving.re[i], im: moving.im[i] };
      // Zoom in around the point with the mouse wheel until a pixel is well below 1 % of |s|,
      // as a user would to pick a pole position precisely.
      const fit = page.getByRole('button', { name: 'Fit locus window' });
      if (await fit.isEnabled()) await fit.click();
      for (let z = 0; z < 40; z++) {
        const a = await locusPagePoint(page, target);
        const b = await locusPagePoint(page, { re: target.re + Math.hypot(target.re, target.im) * 0.01, im: target.im });
        if (Math.abs(b.x - a.x) >= 12) break;
        await page.mouse.move(a.x, a.y);
        await page.mouse.wheel(0, -100);
        await page.waitForTimeout(30);
      }
      const at = await locusPagePoint(page, target);
      const rect = (await page.locator('[data-chart="locus"]').boundingBox())!;
      expect(at.x > rect.x && at.x < rect.x + rect.width && at.y > rect.y && at.y < rect.y + rect.height, 'target on the chart').toBe(true);
      const gen = s0.generation;
      await page.mouse.move(at.x, at.y);
      await page.mouse.click(at.x, at.y);
      await page.waitForFunction(
        (g) =>
          (window as unknown as { __loopwright: { analysis: { state(): { generation: number } } } }).__loopwright.analysis.state()
            .generation > g,
        gen,
      );
      const s1 = await settled(page);
      const nearest = Math.min(...s1.poles!.map((p) => dist(p, target)));
      expect(nearest / Math.hypot(target.re, target.im), `pole near the clicked point ${target.re} ${target.im}`).toBeLessThan(0.01);
      // The gain found is the branch's own gain there (within the trace's resolution).
      expect(Math.abs(s1.sweep!.value - moving.k[i]) / moving.k[i]).toBeLessThan(0.05);
      // …written with 4 significant digits, not 58.17581689930665 (issue 11 item 7).
      expect(s1.sweep!.value).toBe(roundSignificant(s1.sweep!.value, 4));
      expect(s1.sweep!.live).toBeNull();
    }
  });

  it('the Loops table shows the margins that `loopwright loops --json` gives for the same file', async () => {
    const d = demo('positioning-axis');
    await loadDiagram(page, d);
    await settled(page);
    const file = join(downloads, 'positioning-axis.loop.json');
    writeFileSync(file, serializeDiagram(d));
    const r = spawnSync(process.execPath, [join(ROOT, 'apps/cli/bin/loopwright.mjs'), 'loops', file, '--json'], {
      cwd: ROOT,
      encoding: 'utf8',
    });
    expect(r.status, r.stderr).toBe(0);
    const cli = JSON.parse(r.stdout) as {
      cuts: {
        cut: string;
        margins: Record<string, number | boolean | null>;
        alone?: { opened: string[]; margins: Record<string, number | boolean | null> };
      }[];
    };
    await page.getByRole('tab', { name: 'Loops' }).click();
    await settled(page);
    const table = page.getByTestId('loops-table');
    await expect.poll(() => table.locator('tbody tr[data-cut]').count(), { timeout: 15_000 }).toBe(cli.cuts.length);
    expect(cli.cuts.length).toBeGreaterThan(1);
    // Each cut's row (other loops closed) and, for an enclosed loop, its inner-first row (loops around it opened).
    const readings = cli.cuts.flatMap((c) => [
      { name: c.cut, row: `tr[data-cut="${c.cut}"]`, margins: c.margins },
      ...(c.alone && c.alone.opened.length
        ? [{ name: `${c.cut} inner-first`, row: `tr[data-cut-alone="${c.cut}"]`, margins: c.alone.margins }]
        : []),
    ]);
    expect(readings.length).toBeGreaterThan(cli.cuts.length);
    for (const c of readings.map((x) => ({ cut: x.name, rowSel: x.row, margins: x.margins }))) {
      const row = table.locator(c.rowSel);
      for (const field of [
        'gainCrossover',
        'phaseMarginDeg',
        'gainMarginDb',
        'phaseCrossover',
        'delayMargin',
        'peakSensitivity',
        'bandwidth',
        'closedLoopStable',
      ]) {
        const cell = row.locator(`td[data-field="${field}"]`);
        const raw = await cell.getAttribute('data-value');
        const want = c.margins[field];
        if (want === null) expect(raw, `${c.cut} ${field}`).toBe('null');
        else if (typeof want === 'boolean') expect(raw, `${c.cut} ${field}`).toBe(String(want));
        else {
          expect(Number(raw), `${c.cut} ${field}`).toBeCloseTo(want, 6);
          // The text shown rounds the same number to 4 significant digits.
          const shown = Number((await cell.textContent())!.replace('−', '-'));
          expect(Math.abs(shown - want), `${c.cut} ${field} shown`).toBeLessThanOrEqual(Math.abs(want) * 5e-4 + 1e-12);
        }
      }
    }
  });

  it('each export produces a valid file: PNG and SVG of every chart, traces CSV, design report', async () => {
    const save = async (selector: string) => {
      const [chart] = selector.split(':');
      if (chart !== 'traces' && chart !== 'report') {
        // A chart exports once it is drawn; under load the redraw after a tab switch can lag.
        await page.waitForFunction(
          (name) => {
            const h = (window as unknown as { __loopwright?: { analysis?: { chartOption(n: string): unknown } } }).__loopwright?.analysis;
            return !!h && h.chartOption(name) != null;
          },
          chart,
          { timeout: 30_000, polling: 50 },
        );
      }
      // A chart being redrawn at the moment of the click (a late worker reply) answers with a
      // notice asking to export again, as a user would be told; the test then clicks again.
      let dl: Download | null = null;
      for (let attempt = 0; attempt < 3 && !dl; attempt++) {
        const waiting = page.waitForEvent('download', { timeout: 10_000 }).catch(() => null);
        await page.locator(`[data-export="${selector}"]`).first().click();
        dl = await waiting;
      }
      if (!dl) throw new Error(`export ${selector}: no download after three clicks`);
      const path = join(downloads, dl.suggestedFilename());
      await dl.saveAs(path);
      return { path, name: dl.suggestedFilename(), bytes: readFileSync(path) };
    };
    const views: [string, string[]][] = [
      ['Response', ['locus', 'response', 'actuator']],
      ['Frequency', ['bode', 'nyquist', 'sensitivity']],
    ];
    for (const [tab, charts] of views) {
      await page.getByRole('tab', { name: tab }).click();
      await settled(page);
      for (const c of charts) {
        const png = await save(`${c}:png`);
        expect(png.name).toMatch(new RegExp(`${c}\\.png$`));
        const size = pngSize(png.bytes);
        const box = (await page.locator(`[data-chart="${c}"]`).boundingBox())!;
        // Exported at pixel ratio 2 from the chart as drawn.
        expect(size.width).toBe(Math.round(box.width) * 2);
        expect(size.height).toBe(Math.round(box.height) * 2);
        const svg = await save(`${c}:svg`);
        const text = svg.bytes.toString('utf8');
        expect(text.trimStart().startsWith('<svg')).toBe(true);
        expect(text.trimEnd().endsWith('</svg>')).toBe(true);
        expect(text).toMatch(/<path|<polyline|<line/);
        // A legend drawn as HTML on screen is drawn by the chart itself in an export.
        const legend = await page.locator(`[data-chart="${c}"] ~ [data-legend] .lw-html-legend-name`).allTextContents();
        if (c === 'response' || c === 'actuator') expect(legend.length).toBeGreaterThan(0);
        for (const name of legend) expect(text, `${c}.svg names ${name}`).toContain(name);
      }
    }
    await page.getByRole('tab', { name: 'Response' }).click();
    const csv = await save('traces:csv');
    const lines = csv.bytes.toString('utf8').trim().split('\n');
    const header = csvFields(lines[0]);
    const st = await settled(page);
    const keys = Object.keys(st.response!.run.traces);
    expect(header.length).toBe(1 + 2 * keys.length);
    expect(header[0]).toBe('t');
    expect(header.filter((h) => h.endsWith('(linear)')).length).toBe(keys.length);
    expect(lines.length - 1).toBe(st.response!.run.time.length);
    for (const line of [lines[1], lines[Math.floor(lines.length / 2)], lines[lines.length - 1]]) {
      const cells = csvFields(line);
      expect(cells.length).toBe(header.length);
      for (const c of cells) expect(Number.isFinite(Number(c)), `CSV cell ${c}`).toBe(true);
    }
    expect(Number(csvFields(lines[lines.length - 1])[0])).toBeCloseTo(st.response!.run.time.at(-1)!, 9);
    const report = await save('report:html');
    const html = report.bytes.toString('utf8');
    expect(html.startsWith('<!doctype html>')).toBe(true);
    expect(html).toMatch(/functional-safety standards/);
    expect(html).toMatch(/<h2>Loops<\/h2>/);
    expect((html.match(/<svg/g) ?? []).length).toBeGreaterThanOrEqual(5); // the diagram and the charts
    expect(html).not.toMatch(/<script|src="http|href="http/); // self-contained
    for (const p of demo('positioning-axis').parameters) expect(html).toContain(p.name);
  });

  it('pinning and comparing shows both results and a table of the differences', async () => {
    await page.getByRole('tab', { name: 'Compare' }).click();
    await settled(page);
    await page.getByTestId('pin').click();
    // Pinning waits for every result of the current inputs (hidden views included).
    await page.waitForFunction(
      () =>
        (window as unknown as { __loopwright: { analysis: { state(): { pinned: unknown } } } }).__loopwright.analysis.state().pinned !==
        null,
      undefined,
      { timeout: 20_000 },
    );
    const drag = await dragSliderTo(page, 0.2);
    await drag.release();
    await settled(page);
    const table = page.getByTestId('compare-table');
    await expect.poll(() => table.locator('tr.lw-changed').count(), { timeout: 15_000 }).toBeGreaterThan(2);
    await expect.poll(() => table.textContent(), { timeout: 15_000 }).toMatch(/Kp_pos/);
    await page.waitForTimeout(150);
    await screenshot(page, 'analysis-compare');
  });

  it('screenshots of every view for the demo', async () => {
    await loadDiagram(page, demo('positioning-axis'));
    const fit = page.getByRole('button', { name: 'Fit locus window' });
    if (await fit.isEnabled()) await fit.click();
    for (const tab of ['Response', 'Frequency', 'Loops']) {
      await page.getByRole('tab', { name: tab }).click();
      await settled(page);
      await page.waitForTimeout(150);
      await screenshot(page, `analysis-${tab.toLowerCase()}`);
    }
    // The locus with its readout while hovering a branch point.
    const st = await settled(page);
    const b = dominantRangeBranch(st);
    const i = Math.floor(b.re.length / 2);
    const at = await locusPagePoint(page, { re: b.re[i], im: b.im[i] });
    await page.mouse.move(at.x, at.y);
    await expect.poll(() => page.getByTestId('locus-readout').count(), { timeout: 10_000 }).toBe(1);
    expect(await page.getByTestId('locus-readout').textContent()).toMatch(/ζ = .*ωn = /);
    await screenshot(page, 'analysis-locus-hover');
    // The negative-gain locus (dashed) and constant-ωn arcs on request.
    await page.mouse.move(5, 5);
    await page.getByLabel('k < 0').check();
    await page.getByLabel('ωn', { exact: true }).check();
    await expect
      .poll(
        async () => ((await state(page)).locus as unknown as { oppositeBranches: unknown[] | null } | null)?.oppositeBranches?.length ?? 0,
        { timeout: 20_000 },
      )
      .toBeGreaterThan(0);
    await settled(page);
    await page.waitForTimeout(150);
    await screenshot(page, 'analysis-locus-negative');
    await page.getByLabel('k < 0').uncheck();
    await page.getByLabel('ωn', { exact: true }).uncheck();
    // The second demo, and the dark theme.
    await loadDiagram(page, demo('heating-cascade'));
    await page.getByRole('tab', { name: 'Response' }).click();
    await settled(page);
    await page.waitForTimeout(150);
    await screenshot(page, 'analysis-heating-response');
    await page.getByRole('button', { name: 'Switch to dark theme' }).click();
    await page.getByRole('tab', { name: 'Frequency' }).click();
    await settled(page);
    await page.waitForTimeout(150);
    await screenshot(page, 'analysis-heating-frequency-dark');
    await page.getByRole('tab', { name: 'Loops' }).click();
    await settled(page);
    await page.waitForTimeout(100);
    await screenshot(page, 'analysis-heating-loops-dark');
    await page.getByRole('button', { name: 'Switch to light theme' }).click();
  });
});
