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
import type { Page } from 'playwright-core';
import { demoDiagrams, serializeDiagram, type Diagram } from '@loopwright/graph';
import { openEditor, screenshot, type EditorSession } from './harness.ts';

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
  response: { nonlinear: { time: number[]; traces: Record<string, number[]> }; linear: { time: number[]; traces: Record<string, number[]> }; probes: { id: string }[] } | null;
}

const state = (page: Page) =>
  page.evaluate(() => (window as unknown as { __loopwright: { analysis: { state(): unknown } } }).__loopwright.analysis.state()) as Promise<HookState>;

/** Waits until every view has drawn the results of the latest input change. */
async function settled(page: Page): Promise<HookState> {
  await page.waitForFunction(
    () => {
      const h = (window as unknown as { __loopwright?: { analysis?: { state(): { complete: boolean; poles: unknown; response: unknown } } } }).__loopwright?.analysis;
      if (!h) return false;
      const s = h.state();
      return s.complete && s.poles !== null && s.response !== null;
    },
    undefined,
    { timeout: 30_000, polling: 50 },
  );
  return state(page);
}

const demo = (id: string): Diagram => {
  const d = demoDiagrams.find((x) => x.id === id);
  if (!d) throw new Error(`demo ${id} missing`);
  return JSON.parse(JSON.stringify(d.diagram)) as Diagram;
};

async function loadDiagram(page: Page, d: Diagram) {
  await page.evaluate((doc) => (window as unknown as { __loopwright: { setDiagram(d: unknown): void } }).__loopwright.setDiagram(doc), d);
}

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

  it('screenshots of every view for the demo', async () => {
    for (const tab of ['Response', 'Frequency', 'Loops']) {
      await page.getByRole('tab', { name: tab }).click();
      await settled(page);
      await page.waitForTimeout(150);
      await screenshot(page, `analysis-${tab.toLowerCase()}`);
    }
  });
});
