/**
 * The multirate axis demo in the browser: the Frequency view reads the current loop at its
 * 16 kHz sampler (exact margins beside the labelled continuous estimate, the z-plane locus with
 * the unit circle), and the current controller's C code downloads with its test vector.
 * Screenshots in test-artifacts/.
 */
import { readFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { runStudy } from '@loopwright/study';
import { sampledAxis } from '@loopwright/graph';
import { openEditor, screenshot, type EditorSession } from './harness.ts';
import { selectBlock } from './ui.ts';

describe('sampled controllers in the editor', () => {
  let s: EditorSession;
  let page: Page;
  const downloads = mkdtempSync(join(tmpdir(), 'loopwright-sampled-dl-'));

  beforeAll(async () => {
    s = await openEditor({ width: 1440, height: 900 });
    page = s.page;
  });
  afterAll(async () => {
    await s?.close();
    rmSync(downloads, { recursive: true, force: true });
  });

  it('the multirate demo loads from the picker and shows the sampled current loop with its z-plane locus', async () => {
    await page.getByLabel('Load demo').selectOption('sampled-axis');
    await page.getByRole('tab', { name: 'Frequency' }).click();
    await page.getByLabel('Cut shown').selectOption('cut-current');
    const panel = page.getByTestId('sampled-loop');
    await expect
      .poll(async () => (await panel.count()) > 0 && (await panel.textContent()), { timeout: 30_000 })
      .toMatch(/read at current-controller/);
    const text = (await panel.textContent())!;
    expect(text).toMatch(/T = 62\.5e-6 s/);
    expect(text).toMatch(/continuous estimate/);
    expect(text).toMatch(/inside the unit circle/);
    // the numbers are the engine's: the same study the command line runs
    const ref = runStudy(sampledAxis, { kind: 'sampled-cut', cut: 'cut-current' })!;
    const pm = ref.margins!.phaseMarginDeg!;
    expect(await page.getByTestId('sampled-margins').textContent()).toContain(`${Number(pm.toPrecision(4))}°`);
    const svg = page.getByTestId('z-plane-locus');
    expect(await svg.locator('path').count()).toBeGreaterThan(10); // unit circle, guides, branches
    expect(await svg.textContent()).toMatch(/Unit-circle crossings: k = /);
    await panel.scrollIntoViewIfNeeded();
    await screenshot(page, 'sampled-axis-frequency');
    // the Locus pane shows the same z-plane locus on request
    await page.getByLabel('z-plane locus', { exact: true }).check();
    const z = page.getByTestId('locus-z-plane');
    expect(await z.textContent()).toMatch(/read at current-controller/);
    expect(await z.locator('path').count()).toBeGreaterThan(10);
    await screenshot(page, 'sampled-axis-locus-z');
    await page.getByLabel('z-plane locus', { exact: true }).uncheck();
  });

  it('the Loops view lists each loop read at its own sampler', async () => {
    await page.getByRole('tab', { name: 'Loops' }).click();
    const table = page.getByTestId('sampled-loops-table');
    await expect.poll(async () => (await table.count()) > 0 && (await table.locator('tbody tr').count()), { timeout: 30_000 }).toBe(3);
    const text = (await table.textContent())!;
    for (const b of ['current-controller', 'speed-controller', 'position-controller']) expect(text).toContain(b);
    for (const t of ['62.5e-6', '250e-6', '0.001']) expect(text).toContain(t);
    await table.scrollIntoViewIfNeeded();
    await screenshot(page, 'sampled-axis-loops');
  });

  it('the current controller shows its sample time on the card and exports C with a test vector', async () => {
    expect(await page.locator('[data-block="current-controller"]').textContent()).toMatch(/sampled every Ts_cur s, delay 1 sample/);
    await selectBlock(page, 'current-controller');
    const button = page.getByRole('button', { name: 'Export C of current-controller' });
    const files: Record<string, string> = {};
    const got = new Promise<void>((resolve) => {
      page.on('download', (dl) => {
        void (async () => {
          const path = join(downloads, dl.suggestedFilename());
          await dl.saveAs(path);
          files[dl.suggestedFilename()] = readFileSync(path, 'utf8');
          if (Object.keys(files).length === 4) resolve();
        })();
      });
    });
    await button.click();
    await got;
    expect(Object.keys(files).sort()).toEqual([
      'current_controller.c',
      'current_controller.h',
      'current_controller.vector.json',
      'current_controller_check.c',
    ]);
    expect(files['current_controller.c']).toMatch(/current_controller_step/);
    const v = JSON.parse(files['current_controller.vector.json']);
    expect(v.sampleTime).toBe(6.25e-5);
    expect(v.output.length).toBe(400);
    await screenshot(page, 'sampled-axis-export');
  });
});
