/**
 * Commissioning in the browser: the demo test log (a bump test of the heating plant's supply
 * loop, our own scenario) is opened from the demo picker, the three models are fitted, the
 * chosen fit becomes a block and goes into the loop's plant block, the loop is tuned and the
 * setting applied — each applied result one undo step. Then the cascade workflow on the
 * heating cascade, and a test log dropped on the view and opened with the file picker.
 * Results are read from window.__loopwright (what the views hold); screenshots go to
 * test-artifacts/.
 */
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { openEditor, screenshot, type EditorSession } from './harness.ts';

const ROOT = resolve(import.meta.dirname, '..', '..');
const LOG = resolve(ROOT, 'packages/fit/src/demos/supply-valve-bump.csv');

interface Fit {
  model: string;
  result: {
    ok: boolean;
    value?: { model: { gain: number; timeConstants: number[]; deadTime: number }; nrmse: number; expression: string };
  };
}
interface Commission {
  log: { fileName: string } | null;
  fit: { fits: Fit[]; log: { samples: number } } | null;
  fitError: string | null;
  fitting: boolean;
  tune: {
    rule: string;
    block: { id: string } | null;
    controller: { kp: number; ti: number | null; td: number };
    predicted: {
      gainMargin: number | null;
      phaseMarginDeg: number | null;
      delayMargin: number | null;
      peakSensitivity: number | null;
      closedLoopStable: boolean;
    };
    current: { phaseMarginDeg: number | null } | null;
    responses: {
      time: number[];
      setpoint: { before: number[] | null; after: number[] };
      load: { before: number[] | null; after: number[] };
    } | null;
    apply: { block: string; parameters: Record<string, number> } | null;
  } | null;
  tuning: boolean;
  cascade: {
    steps: { cut: string; result: { ok: boolean } }[];
    apply: { block: string }[];
    separations: { ratio: number | null; flag: boolean }[];
  } | null;
}
interface Doc {
  blocks: { id: string; kind: string; params: Record<string, unknown> }[];
  parameters: { name: string; value: number }[];
  fits?: { block: string; source: { fileName: string | null; sha256: string | null }; expression: string }[];
}

type Hook = { commission: { state(): Commission }; getDiagram(): Doc; historySize(): { past: number; future: number }; undo(): void };
const hook = (page: Page) =>
  page.evaluate(() => {
    const h = (window as unknown as { __loopwright: Hook }).__loopwright;
    return { c: h.commission.state(), d: h.getDiagram(), history: h.historySize() };
  });

async function until(page: Page, what: string, test: (c: Commission) => boolean): Promise<Commission> {
  const deadline = Date.now() + 60_000;
  for (;;) {
    const { c } = await hook(page);
    if (test(c)) return c;
    if (Date.now() > deadline)
      throw new Error(`timed out waiting for ${what}: ${JSON.stringify({ fitError: c.fitError, fitting: c.fitting, tuning: c.tuning })}`);
    await page.waitForTimeout(100);
  }
}

const fitted = (c: Commission) => !c.fitting && c.fit !== null && c.fit.fits.every((f) => f.result.ok);

describe('commissioning: from a test log to a tuned loop', () => {
  let s: EditorSession;
  beforeAll(async () => {
    s = await openEditor({ width: 1440, height: 1000 });
    // More room for the analysis views (the splitter's keyboard path: 30 px a step).
    const splitter = s.page.getByRole('separator', { name: 'Resize analysis area' });
    await splitter.focus();
    for (let i = 0; i < 9; i++) await s.page.keyboard.press('ArrowUp');
  });
  afterAll(async () => {
    await s?.close();
  });

  it('opens the sample test log, fits it, makes and updates a block, tunes the loop and applies the setting', async () => {
    const page = s.page;
    await page.getByLabel('Load demo').selectOption('supply-loop');
    await page.getByLabel('Load demo').selectOption('log:supply-valve-bump');
    const c = await until(page, 'the three fits', fitted);
    expect(c.log!.fileName).toBe('supply-valve-bump.csv');
    expect(c.fit!.log.samples).toBe(1801);
    expect(await page.getByRole('tab', { name: 'Test log' }).getAttribute('aria-selected')).toBe('true');
    expect(await page.getByTestId('fit-table').locator('tr[data-model]').count()).toBe(3);
    await expect.poll(() => page.getByRole('note').filter({ hasText: 'only as good as the test' }).count()).toBe(1);
    // The SOPDT fit holds the generating plant (0.8 K/%, 90 s and 12 s, 20 s) to a few per cent.
    const sopdt = c.fit!.fits.find((f) => f.model === 'sopdt')!.result.value!;
    expect(Math.abs(sopdt.model.gain - 0.8)).toBeLessThan(0.02);
    expect(Math.abs(sopdt.model.deadTime - 20)).toBeLessThan(2);
    // The charts drew the data, the fits and the residuals.
    const names = await page.evaluate(() =>
      (window as unknown as { __loopwright: { analysis: { chartNames(): string[] } } }).__loopwright.analysis.chartNames(),
    );
    expect(names).toEqual(expect.arrayContaining(['fit', 'residuals']));
    await page.getByLabel('Use the SOPDT fit').check();
    await screenshot(page, 'commission-1-test-log');

    // Make a block: one undo step, with its fit record.
    const before = (await hook(page)).history.past;
    await page.getByTestId('make-block').click();
    await expect.poll(async () => (await hook(page)).d.fits?.length ?? 0).toBe(1);
    let h = await hook(page);
    expect(h.history.past).toBe(before + 1);
    const made = h.d.fits![0].block;
    expect(h.d.blocks.find((b) => b.id === made)!.params.expression).toBe(sopdt.expression);
    expect(h.d.fits![0].source).toMatchObject({ fileName: 'supply-valve-bump.csv', sha256: expect.stringMatching(/^[0-9a-f]{64}$/) });
    await page.getByRole('button', { name: 'Undo' }).click();
    await expect.poll(async () => (await hook(page)).d.blocks.some((b) => b.id === made)).toBe(false);

    // Update the loop's plant block with the fit (select it on the canvas first).
    await page.locator('[data-block="supply-plant"]').click();
    await expect.poll(() => page.getByTestId('update-block').isEnabled()).toBe(true);
    await page.getByTestId('update-block').click();
    await expect.poll(async () => (await hook(page)).d.fits?.map((f) => f.block)).toEqual(['supply-plant']);
    h = await hook(page);
    expect(h.d.blocks.find((b) => b.id === 'supply-plant')!.params.expression).toBe(sopdt.expression);
    await expect.poll(() => page.getByTestId('fit-record').count()).toBe(1);
    await screenshot(page, 'commission-2-block-updated');

    // Tune the supply loop (SIMC, PI) on the fitted plant.
    await page.getByRole('tab', { name: 'Tune' }).click();
    const t = (await until(page, 'the suggestion', (x) => !x.tuning && x.tune !== null && x.tune.responses !== null)).tune!;
    expect(t.block!.id).toBe('supply-controller');
    expect(t.predicted.closedLoopStable).toBe(true);
    expect(t.predicted.phaseMarginDeg!).toBeGreaterThan(45);
    expect(t.current!.phaseMarginDeg).not.toBeNull();
    // Responses before (today) and after, both settling at the set-point (integral action).
    expect(t.responses!.setpoint.before).not.toBeNull();
    const last = (xs: number[]) => xs[xs.length - 1];
    expect(Math.abs(last(t.responses!.setpoint.after) - 1)).toBeLessThan(0.01);
    await expect.poll(() => page.getByTestId('tune-table').locator('tr[data-row]').count()).toBe(2);
    await expect.poll(() => page.getByRole('note').filter({ hasText: 'commission them in small steps' }).count()).toBe(1);
    const charts = await page.evaluate(() =>
      (window as unknown as { __loopwright: { analysis: { chartNames(): string[] } } }).__loopwright.analysis.chartNames(),
    );
    expect(charts).toEqual(expect.arrayContaining(['tune-setpoint', 'tune-load']));
    await screenshot(page, 'commission-3-tune');

    const past = (await hook(page)).history.past;
    await page.getByTestId('apply-tune').click();
    await expect.poll(async () => (await hook(page)).d.parameters.find((p) => p.name === 'Kp')!.value).toBe(t.controller.kp);
    h = await hook(page);
    expect(h.history.past).toBe(past + 1);
    expect(h.d.parameters.find((p) => p.name === 'Ti')!.value).toBe(t.controller.ti);
    // The next suggestion sees the applied setting as today's.
    await until(
      page,
      'the refreshed suggestion',
      (x) => !x.tuning && x.tune !== null && Math.abs((x.tune.current?.phaseMarginDeg ?? 0) - t.predicted.phaseMarginDeg!) < 1e-6,
    );

    // Gain for ζ = 0.7 on the exact locus of the current sweep (Kp), set in one step.
    await page.getByTestId('damping').getByRole('button', { name: 'Find' }).click();
    await expect.poll(() => page.getByTestId('damping-value').textContent(), { timeout: 30_000 }).toMatch(/^Kp \[%\/K\] = /);
    const found = (await hook(page)).c as unknown as { damping: { value: number; pole: { re: number; im: number } } };
    expect(-found.damping.pole.re / Math.hypot(found.damping.pole.re, found.damping.pole.im)).toBeCloseTo(0.7, 6);
    const steps = (await hook(page)).history.past;
    await page.getByTestId('damping').getByRole('button', { name: /^Set / }).click();
    await expect.poll(async () => (await hook(page)).d.parameters.find((p) => p.name === 'Kp')!.value).toBe(found.damping.value);
    expect((await hook(page)).history.past).toBe(steps + 1);
  });

  it('tunes the heating cascade inner-first and applies it as one step', async () => {
    const page = s.page;
    await page.getByLabel('Load demo').selectOption('heating-cascade');
    await page.getByRole('tab', { name: 'Tune' }).click();
    await page.getByTestId('tune-cascade').click();
    const c = (await until(page, 'the cascade', (x) => x.cascade !== null)).cascade!;
    expect(c.steps.map((x) => [x.cut, x.result.ok])).toEqual([
      ['cut-supply', true],
      ['cut-room', true],
    ]);
    expect(c.separations[0].ratio!).toBeGreaterThan(3);
    await screenshot(page, 'commission-4-cascade');
    const past = (await hook(page)).history.past;
    await page.getByTestId('apply-cascade').click();
    await expect.poll(async () => (await hook(page)).history.past).toBe(past + 1);
  });

  it('a test log dropped on the view, or opened with the file picker, is read and fitted', async () => {
    const page = s.page;
    await page.getByRole('tab', { name: 'Test log' }).click();
    const text = readFileSync(LOG, 'utf8').replaceAll(',', ';').replaceAll('.', ','); // semicolons and decimal commas
    await page.evaluate((csv) => {
      const dt = new DataTransfer();
      dt.items.add(new File([csv], 'dropped-bump.csv', { type: 'text/csv' }));
      document
        .querySelector('[data-testid="fit-view"]')!
        .dispatchEvent(new DragEvent('drop', { dataTransfer: dt, bubbles: true, cancelable: true }));
    }, text);
    let c = await until(page, 'the dropped log', (x) => x.log?.fileName === 'dropped-bump.csv' && fitted(x));
    expect(c.fit!.log.samples).toBe(1801);
    await page.getByTestId('test-log-input').setInputFiles(LOG);
    c = await until(page, 'the opened log', (x) => x.log?.fileName === 'supply-valve-bump.csv' && fitted(x));
    expect(c.fit!.log.samples).toBe(1801);
    // A bad column choice says what is wrong and keeps the picker.
    await page.getByLabel('output column').selectOption('time_s');
    c = await until(page, 'the column error', (x) => x.fitError !== null);
    expect(c.fitError).toContain('three different columns');
    await expect.poll(() => page.getByTestId('fit-error').textContent()).toContain('three different columns');
    await page.getByLabel('output column').selectOption('supply_temp_C');
    await until(page, 'the refit', fitted);
  });
});
