/**
 * The notch filter in the browser: taken from Parts into the demo's speed loop (dropped on the
 * current-demand wire, after the speed controller, where a notch meets a mechanical resonance),
 * its fields edited in Details with units and inline checks, and its card. `window.__loopwright`
 * is only READ.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { openEditor, screenshot, type EditorSession } from './harness.ts';
import { getDiagram, history, selectBlock, setField } from './ui.ts';

describe('notch filter block', () => {
  let s: EditorSession;
  let page: Page;
  beforeAll(async () => {
    s = await openEditor({ width: 1400, height: 860 });
    page = s.page;
    page.setDefaultTimeout(8000);
  });
  afterAll(async () => {
    await s?.close();
  });

  it('goes from Parts into the speed loop, takes its fields with units and checks, and shows its figures', async () => {
    await page.waitForSelector('.canvas-box:not([data-fit-pending])', { timeout: 20_000 });
    await page.waitForTimeout(500);
    const before = await getDiagram(page);
    const h = (await history(page)).past;
    // The current-demand wire runs straight from the speed controller to the current junction: drop on its middle.
    const path = (await page.locator('[data-testid="rf__edge-w-current-demand"] path.react-flow__edge-path').boundingBox())!;
    const pane = page.locator('.react-flow__pane');
    const box = (await pane.boundingBox())!;
    await page
      .getByRole('button', { name: 'Add Notch filter', exact: true })
      .dragTo(pane, { targetPosition: { x: path.x + path.width / 2 - box.x, y: path.y + path.height / 2 - box.y } });
    await expect.poll(async () => (await getDiagram(page)).blocks.length).toBe(before.blocks.length + 1);
    let d = await getDiagram(page);
    const n = d.blocks.at(-1)!;
    expect(n.kind).toBe('notch');
    expect(n.id).toBe('notch1'); // the catalogue's id prefix
    expect(n.params).toEqual({ frequency: 50, frequencyUnit: 'Hz', depth: -20, damping: 0.3 });
    expect(
      d.wires.filter((w) => w.from.block === n.id || w.to.block === n.id).map((w) => `${w.from.block}->${w.to.block}.${w.to.port}`),
    ).toEqual(['speed-controller->notch1.in', 'notch1->current-error.in1']);
    expect((await history(page)).past).toBe(h + 1);

    await selectBlock(page, n.id);
    const details = page.getByLabel(`Details of ${n.id}`);
    await expect.poll(() => details.isVisible()).toBe(true);
    // The frequency's unit is the unit field's choice.
    const freqLabel = details.locator('label', { hasText: 'Notch frequency' });
    expect(await freqLabel.textContent()).toContain('[Hz]');

    // A depth above 0 dB is refused inline, naming the limit in dB; the document keeps the old value.
    const depth = page.getByLabel('Depth (gain at the notch)', { exact: true });
    await depth.click();
    await depth.press('Control+a');
    await depth.pressSequentially('6');
    await expect.poll(() => depth.getAttribute('aria-invalid')).toBe('true');
    expect(await details.locator('.has-error').textContent()).toContain('dB');
    await depth.press('Enter');
    expect((await getDiagram(page)).blocks.find((b) => b.id === n.id)!.params.depth).toBe(-20);
    await depth.press('Escape');

    await setField(page, 'Notch frequency', '120');
    await setField(page, 'Depth (gain at the notch)', '-30');
    await setField(page, 'Width (pole damping ζp)', '0.25');
    d = await getDiagram(page);
    expect(d.blocks.find((b) => b.id === n.id)!.params).toEqual({ frequency: 120, frequencyUnit: 'Hz', depth: -30, damping: 0.25 });
    const card = page.locator(`[data-block="${n.id}"]`);
    // −3 dB width 2·fn·√(ζp² − 2ζz²) = 240·√(0.0625 − 2·0.0625·10⁻³) = 59.94 Hz
    await expect.poll(() => card.locator('.lw-card-caption').textContent()).toBe('120 Hz, -30 dB, -3 dB width 59.94 Hz');
    expect(await card.locator('.lw-card-formula').count()).toBe(1);
    expect(await card.locator('svg.lw-icon').count()).toBe(1);
    // Tidy makes room beside the speed controller; zoom in on the card for the picture.
    await page.getByRole('button', { name: 'Tidy layout', exact: true }).click();
    await page.waitForSelector('.canvas-box:not([data-fit-pending])', { timeout: 20_000 });
    await page.waitForTimeout(500);
    const c = (await card.boundingBox())!;
    await page.mouse.move(c.x + c.width / 2, c.y + c.height / 2);
    for (let i = 0; i < 6; i++) {
      await page.mouse.wheel(0, -200);
      await page.waitForTimeout(80);
    }
    await page.waitForTimeout(400);
    await screenshot(page, 'notch-in-speed-loop');

    // Switching the unit to rad/s keeps the number and relabels it; 120 rad/s is then the notch.
    await page.getByLabel('Frequency unit', { exact: true }).selectOption('rad/s');
    await expect.poll(() => freqLabel.textContent()).toContain('[rad/s]');
    await expect.poll(() => card.locator('.lw-card-caption').textContent()).toBe('120 rad/s, -30 dB, -3 dB width 59.94 rad/s');
    await screenshot(page, 'notch-details-rad-per-s');
  });
});
