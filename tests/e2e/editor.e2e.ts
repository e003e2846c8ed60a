/**
 * Editor browser tests (playwright-core + Debian chromium). One browser for the whole file,
 * on one profile, so that reload and autosave are tested for real. The build is driven
 * through the UI only (mouse on the canvas and Parts, keyboard in Details and Parameters);
 * `window.__loopwright` is used only to READ the document and history.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { blockSpec, serializeDiagram, parseDiagram, type Diagram, type BlockKind } from '@loopwright/graph';
import { InputError, parseTransferFunction } from '@loopwright/lti';
import { openEditor, screenshot, type EditorSession } from './harness.ts';
import { getDiagram, history, selectBlock, setField, wire } from './ui.ts';

/** The document without block positions (where a click lands depends on the viewport). */
function withoutPositions(d: Diagram) {
  return { ...d, blocks: d.blocks.map(({ position: _p, ...rest }) => rest) };
}

function defaults(kind: BlockKind): Record<string, number | string> {
  return Object.fromEntries(blockSpec(kind).params.map((p) => [p.name, p.default]));
}

describe('editor', () => {
  let s: EditorSession;
  let page: Page;
  const profile = mkdtempSync(join(tmpdir(), 'loopwright-profile-'));
  const downloads = mkdtempSync(join(tmpdir(), 'loopwright-dl-'));
  /** The document after each build step (index 0: the empty diagram). */
  const steps: Diagram[] = [];
  let built: Diagram;

  beforeAll(async () => {
    s = await openEditor({ profileDir: profile });
    page = s.page;
    page.setDefaultTimeout(8000);
  });
  afterAll(async () => {
    await s?.close();
    rmSync(profile, { recursive: true, force: true });
    rmSync(downloads, { recursive: true, force: true });
  });

  it('the page under test is the production build users run (no React development runtime)', async () => {
    const scripts = await page.evaluate(async () => {
      const srcs = [...document.querySelectorAll<HTMLScriptElement>('script[type="module"][src]')].map((x) => x.src);
      return Promise.all(srcs.map(async (src) => (await fetch(src)).text()));
    });
    expect(scripts.length).toBeGreaterThan(0);
    for (const text of scripts) {
      // React's development JSX runtime and DOM nesting checks are left out of a production bundle.
      expect(text.includes('jsxDEV')).toBe(false);
      expect(text.includes('cannot be a child of')).toBe(false);
    }
  });

  it('builds a loop from an empty diagram with mouse and keyboard; no findings; expected document', async () => {
    await page.getByRole('button', { name: 'New diagram' }).click();
    let d = await getDiagram(page);
    expect(d.blocks).toEqual([]);
    const h0 = (await history(page)).past;
    steps.push(d);
    // Every UI step below must be exactly ONE undoable edit (selection and measuring are not).
    const step = async (what: string, act: () => Promise<void>) => {
      const before = (await history(page)).past;
      await act();
      await page.waitForTimeout(30);
      const after = (await history(page)).past;
      expect(after, `one history entry for: ${what}`).toBe(before + 1);
      steps.push(await getDiagram(page));
    };

    for (const title of ['Source', 'Summing junction', 'PID controller', 'Saturation', 'Transfer function', 'Probe']) {
      await step(`add ${title}`, () => page.getByRole('button', { name: `Add ${title}`, exact: true }).click());
    }
    await page.getByRole('button', { name: 'Fit to view' }).click();
    await page.waitForTimeout(250);
    d = await getDiagram(page);
    expect(d.blocks.map((b) => b.id)).toEqual(['src1', 'sum1', 'pid1', 'sat1', 'tf1', 'probe1']);

    // Wires with the mouse.
    await step('wire src→sum', () => wire(page, 'src1-out', 'sum1-in1'));
    await step('wire sum→pid', () => wire(page, 'sum1-out', 'pid1-in'));
    await step('wire pid→sat', () => wire(page, 'pid1-out', 'sat1-in'));
    await step('wire sat→tf', () => wire(page, 'sat1-out', 'tf1-in'));
    await step('wire tf→probe', () => wire(page, 'tf1-out', 'probe1-in'));
    // The feedback wire by keyboard, from the junction's Details.
    await selectBlock(page, 'sum1');
    expect((await history(page)).past).toBe(h0 + steps.length - 1); // selecting is not an edit
    await step('feedback tf→sum.in2', async () => {
      await page.getByLabel('Input in2 of sum1 comes from').selectOption('tf1.out');
    });

    // A named parameter, renamed, with a value.
    await step('add parameter', () => page.getByRole('button', { name: 'Add parameter' }).click());
    await step('rename p1→Kp', () => setField(page, 'Name of parameter p1', 'Kp'));
    await step('Kp = 2', () => setField(page, 'Value of Kp', '2'));

    // Block fields by keyboard.
    await selectBlock(page, 'pid1');
    await step('pid kp = Kp', () => setField(page, 'Proportional gain kp', 'Kp'));
    await step('pid ti = 1.5', () => setField(page, 'Integral time ti', '1.5'));
    await selectBlock(page, 'tf1');
    await step('plant', () => setField(page, 'Expression in s', '4/(s*(0.5*s + 1))'));
    await selectBlock(page, 'sat1');
    await step('sat lower', () => setField(page, 'Lower limit', '-2'));
    await step('sat upper', () => setField(page, 'Upper limit', '2'));

    built = await getDiagram(page);
    await expect.poll(() => page.getByLabel('No findings').count()).toBe(1);
    await screenshot(page, 'editor-built-loop');

    const expected = {
      ...steps[0],
      parameters: [{ name: 'Kp', value: 2, min: 0, max: 10 }],
      blocks: [
        { id: 'src1', kind: 'source', params: defaults('source') },
        { id: 'sum1', kind: 'summing-junction', params: defaults('summing-junction') },
        { id: 'pid1', kind: 'pid', params: { ...defaults('pid'), kp: 'Kp', ti: 1.5 } },
        { id: 'sat1', kind: 'saturation', params: { ...defaults('saturation'), lower: -2, upper: 2 } },
        { id: 'tf1', kind: 'transfer-function', params: { ...defaults('transfer-function'), expression: '4/(s*(0.5*s + 1))' } },
        { id: 'probe1', kind: 'probe', params: defaults('probe') },
      ],
      wires: [
        { id: 'w1', from: { block: 'src1', port: 'out' }, to: { block: 'sum1', port: 'in1' } },
        { id: 'w2', from: { block: 'sum1', port: 'out' }, to: { block: 'pid1', port: 'in' } },
        { id: 'w3', from: { block: 'pid1', port: 'out' }, to: { block: 'sat1', port: 'in' } },
        { id: 'w4', from: { block: 'sat1', port: 'out' }, to: { block: 'tf1', port: 'in' } },
        { id: 'w5', from: { block: 'tf1', port: 'out' }, to: { block: 'probe1', port: 'in' } },
        { id: 'w6', from: { block: 'tf1', port: 'out' }, to: { block: 'sum1', port: 'in2' } },
      ],
    };
    expect(withoutPositions(built)).toEqual(expected);
    // Positions sit on the 10-unit grid and no two cards share a spot.
    for (const b of built.blocks) {
      expect(Math.abs(b.position.x % 10)).toBe(0);
      expect(Math.abs(b.position.y % 10)).toBe(0);
    }
    expect(new Set(built.blocks.map((b) => `${b.position.x},${b.position.y}`)).size).toBe(built.blocks.length);
    // The document the UI built is a valid file (round-trips through the schema).
    expect(parseDiagram(serializeDiagram(built))).toEqual(built);
  });

  it('an invalid expression shows its error and position and does not change the document', async () => {
    await selectBlock(page, 'tf1');
    const before = await getDiagram(page);
    const bad = '4/(s*(0.5*s + 1)) + 3*#';
    const field = page.getByLabel('Expression in s', { exact: true });
    await field.click();
    await field.press('Control+a');
    await field.pressSequentially(bad);
    const alert = page.getByRole('alert', { name: 'Expression in s error' });
    await expect.poll(() => alert.count()).toBe(1);
    // The position the UI shows is the one the parser reports.
    let expectedPos = -1;
    try {
      parseTransferFunction(bad, { Kp: 2 });
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      expectedPos = (e as InputError).details.position ?? -1;
    }
    expect(expectedPos).toBe(bad.indexOf('#'));
    expect(await alert.locator('[data-position]').getAttribute('data-position')).toBe(String(expectedPos));
    expect(await alert.locator('.echo-bad').textContent()).toBe('#');
    expect(await field.getAttribute('aria-invalid')).toBe('true');
    await screenshot(page, 'editor-expression-error');
    await field.press('Enter');
    await page.getByLabel('Diagram title').click(); // leave the field (blur commits only valid text)
    expect(await getDiagram(page)).toEqual(before);
    // A value outside physical sense is flagged from the ParamSpec limits, and not written.
    await selectBlock(page, 'pid1');
    const ti = page.getByLabel('Integral time ti', { exact: true });
    await ti.click();
    await ti.press('Control+a');
    await ti.pressSequentially('-3');
    await expect.poll(() => page.getByRole('alert', { name: 'Integral time ti error' }).textContent()).toMatch(/above 0/);
    await ti.press('Escape');
    await ti.press('Enter');
    expect(await getDiagram(page)).toEqual(before);
    // An unknown name is an error with a way out: create the parameter, and the field is written.
    await ti.click();
    await ti.press('Control+a');
    await ti.pressSequentially('Tint');
    await expect.poll(() => page.getByRole('alert', { name: 'Integral time ti error' }).textContent()).toMatch(/Tint/);
    await page.getByRole('button', { name: 'Create parameter Tint' }).click();
    const after = await getDiagram(page);
    expect(after.parameters.map((p) => p.name)).toEqual(['Kp', 'Tint']);
    expect(after.blocks.find((b) => b.id === 'pid1')!.params.ti).toBe('Tint');
    await page.keyboard.press('Escape');
    await page.locator('.react-flow__pane').click({ position: { x: 5, y: 5 } });
    await page.keyboard.press('Control+z');
    await page.keyboard.press('Control+z');
    expect(await getDiagram(page)).toEqual(before);
  });

  it('undo and redo walk through the whole build, step by step', async () => {
    const n = steps.length - 1;
    expect(await getDiagram(page)).toEqual(steps[n]);
    await page.locator('.react-flow__pane').click({ position: { x: 5, y: 5 } });
    for (let i = n - 1; i >= 0; i--) {
      await page.keyboard.press('Control+z');
      expect(await getDiagram(page), `after undo to step ${i}`).toEqual(steps[i]);
    }
    for (let i = 1; i <= n; i++) {
      await page.keyboard.press(i % 2 ? 'Control+Shift+Z' : 'Control+y');
      expect(await getDiagram(page), `after redo to step ${i}`).toEqual(steps[i]);
    }
    // Ctrl+A, Delete, then undo brings everything back in one step.
    await page.keyboard.press('Control+a');
    await page.keyboard.press('Delete');
    expect((await getDiagram(page)).blocks).toEqual([]);
    await page.getByRole('button', { name: 'Undo' }).click();
    expect(await getDiagram(page)).toEqual(built);
  });

  it('reload restores the autosaved diagram', async () => {
    await page.reload();
    await page.waitForFunction(() => Boolean((window as unknown as { __loopwright?: unknown }).__loopwright));
    expect(await getDiagram(page)).toEqual(built);
  });

  it('save then open gives the identical document', async () => {
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Save diagram' }).click()]);
    const path = join(downloads, download.suggestedFilename());
    await download.saveAs(path);
    expect(download.suggestedFilename()).toMatch(/\.loop\.json$/);
    const bytes = readFileSync(path, 'utf8');
    expect(bytes).toBe(serializeDiagram(built));
    await page.getByRole('button', { name: 'New diagram' }).click();
    expect((await getDiagram(page)).blocks).toEqual([]);
    await page.getByTestId('open-file-input').setInputFiles(path);
    await expect.poll(async () => (await getDiagram(page)).blocks.length).toBe(built.blocks.length);
    expect(await getDiagram(page)).toEqual(built);

    // Ctrl+S saves the same bytes; dropping the file on the window opens it.
    await page.locator('.react-flow__pane').click({ position: { x: 5, y: 5 } });
    const [again] = await Promise.all([page.waitForEvent('download'), page.keyboard.press('Control+s')]);
    const path2 = join(downloads, `again-${again.suggestedFilename()}`);
    await again.saveAs(path2);
    expect(readFileSync(path2, 'utf8')).toBe(bytes);
    await page.getByRole('button', { name: 'New diagram' }).click();
    expect((await getDiagram(page)).blocks).toEqual([]);
    const dt = await page.evaluateHandle((text) => {
      const d = new DataTransfer();
      d.items.add(new File([text], 'dropped.loop.json', { type: 'application/json' }));
      return d;
    }, bytes);
    await page.dispatchEvent('.app', 'dragover', { dataTransfer: dt });
    await page.dispatchEvent('.app', 'drop', { dataTransfer: dt });
    await expect.poll(async () => (await getDiagram(page)).blocks.length).toBe(built.blocks.length);
    expect(await getDiagram(page)).toEqual(built);
  });

  it('a corrupt or invalid file opens nothing, says why, and leaves the diagram untouched', async () => {
    const before = await getDiagram(page);
    await page.getByTestId('open-file-input').setInputFiles({
      name: 'broken.loop.json',
      mimeType: 'application/json',
      buffer: Buffer.from('{"format": "loopwright.diagram", "blocks": [ {'),
    });
    const alert = page.getByRole('alert', { name: 'Error', exact: true });
    await expect.poll(() => alert.textContent()).toMatch(/Could not open broken\.loop\.json/);
    expect(await getDiagram(page)).toEqual(before);
    // Valid JSON, but a PID gain that is a list: the message names the block and the field.
    const bad = JSON.parse(serializeDiagram(built)) as Diagram;
    (bad.blocks.find((b) => b.id === 'pid1')!.params as Record<string, unknown>).kp = [1, 2];
    await page
      .getByTestId('open-file-input')
      .setInputFiles({ name: 'dangling.loop.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(bad)) });
    await expect.poll(() => alert.textContent()).toMatch(/dangling\.loop\.json.*pid1.*kp/s);
    expect(await getDiagram(page)).toEqual(before);
  });

  it('a finding marks its culprit and clicking it selects the culprit', async () => {
    if (await page.getByRole('button', { name: 'Dismiss message' }).count())
      await page.getByRole('button', { name: 'Dismiss message' }).click();
    await selectBlock(page, 'sum1');
    // Disconnect the feedback input: the junction now has an undriven input.
    await page.getByLabel('Input in2 of sum1 comes from').selectOption('');
    const item = page.locator('.finding', { hasText: 'sum1' }).first();
    await expect.poll(() => item.count()).toBe(1);
    await page.locator('.react-flow__pane').click({ position: { x: 5, y: 5 } });
    expect(
      (
        await page.evaluate(() =>
          (window as unknown as { __loopwright: { getSelection(): { blocks: string[] } } }).__loopwright.getSelection(),
        )
      ).blocks,
    ).toEqual([]);
    await item.click();
    const sel = await page.evaluate(() =>
      (window as unknown as { __loopwright: { getSelection(): { blocks: string[] } } }).__loopwright.getSelection(),
    );
    expect(sel.blocks).toContain('sum1');
    expect(await page.locator('[data-block="sum1"]').getAttribute('class')).toMatch(/fault-/);
    await page.getByRole('button', { name: 'Undo' }).click();
    expect(await getDiagram(page)).toEqual(built);
  });

  it('parts by drag and drop, copy/paste, a cut drawn on its wire, tidy layout — each one undo step', async () => {
    expect(await getDiagram(page)).toEqual(built);
    const pane = page.locator('.react-flow__pane');
    const box = (await pane.boundingBox())!;
    await page.getByRole('button', { name: 'Add Gain', exact: true }).dragTo(pane, { targetPosition: { x: 60, y: box.height - 60 } });
    await expect.poll(async () => (await getDiagram(page)).blocks.map((b) => b.id)).toContain('gain1');
    await page.keyboard.press('Delete');
    expect(await getDiagram(page)).toEqual(built);

    await selectBlock(page, 'pid1');
    await page.keyboard.press('Control+c');
    await page.keyboard.press('Control+v');
    const pasted = await getDiagram(page);
    expect(pasted.blocks.map((b) => b.id)).toEqual([...built.blocks.map((b) => b.id), 'pid2']);
    expect(pasted.blocks.at(-1)!.params).toEqual(built.blocks.find((b) => b.id === 'pid1')!.params);
    await page.keyboard.press('Control+z');
    expect(await getDiagram(page)).toEqual(built);

    // Select the feedback wire on the canvas and cut it from Details.
    await page.getByRole('button', { name: 'Fit to view' }).click();
    await page.waitForTimeout(300);
    const onWire = await page.locator('[data-testid="rf__edge-w6"] .react-flow__edge-interaction').evaluate((el) => {
      const path = el as SVGPathElement;
      const p = path.getPointAtLength(path.getTotalLength() * 0.5);
      const m = path.getScreenCTM()!;
      return { x: p.x * m.a + p.y * m.c + m.e, y: p.x * m.b + p.y * m.d + m.f };
    });
    await page.mouse.click(onWire.x, onWire.y);
    await expect
      .poll(
        async () =>
          (
            await page.evaluate(() =>
              (window as unknown as { __loopwright: { getSelection(): { wires: string[] } } }).__loopwright.getSelection(),
            )
          ).wires,
      )
      .toEqual(['w6']);
    await page.getByRole('button', { name: 'Cut wire w6' }).click();
    expect((await getDiagram(page)).cuts).toEqual([{ id: 'cut1', wire: 'w6' }]);
    await expect.poll(() => page.getByTestId('cut-cut1').count()).toBe(1);
    await screenshot(page, 'editor-cut');
    await page.keyboard.press('Control+z');
    expect(await getDiagram(page)).toEqual(built);

    // Sweeping Kp highlights it where it enters (the PID's gain), and nowhere else.
    await page.getByRole('button', { name: 'Sweep Kp' }).click();
    await expect.poll(() => page.locator('[data-block="pid1"] .fx-swept').count()).toBe(1);
    expect(await page.locator('.fx-swept').count()).toBe(1);
    expect(await page.getByRole('button', { name: 'Sweep Kp' }).getAttribute('aria-pressed')).toBe('true');
    await page.keyboard.press('Control+z');
    expect(await getDiagram(page)).toEqual(built);

    const before = (await history(page)).past;
    await page.getByRole('button', { name: 'Tidy layout' }).click();
    await expect
      .poll(async () => JSON.stringify((await getDiagram(page)).blocks.map((b) => b.position)))
      .not.toBe(JSON.stringify(built.blocks.map((b) => b.position)));
    expect((await history(page)).past).toBe(before + 1);
    await page.waitForTimeout(200);
    // Left to right along the forward path, and no two cards overlap on screen.
    const tidy = await getDiagram(page);
    const x = (id: string) => tidy.blocks.find((b) => b.id === id)!.position.x;
    expect(x('src1') < x('sum1') && x('sum1') < x('pid1') && x('pid1') < x('sat1') && x('sat1') < x('tf1') && x('tf1') < x('probe1')).toBe(
      true,
    );
    const rects = await page
      .locator('.react-flow__node')
      .evaluateAll((els) => els.map((e) => e.getBoundingClientRect().toJSON() as DOMRect));
    for (let i = 0; i < rects.length; i++)
      for (let j = i + 1; j < rects.length; j++) {
        const a = rects[i],
          b = rects[j];
        const overlap = a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;
        expect(overlap, `nodes ${i} and ${j} overlap`).toBe(false);
      }
    await screenshot(page, 'editor-tidy');
    await page.getByRole('button', { name: 'Undo' }).click();
    expect(await getDiagram(page)).toEqual(built);

    // Shift+drag draws a selection box: everything inside it is selected.
    await page.getByRole('button', { name: 'Fit to view' }).click();
    await page.waitForTimeout(300);
    const paneBox = (await pane.boundingBox())!;
    await page.keyboard.down('Shift');
    await page.mouse.move(paneBox.x + 4, paneBox.y + 4);
    await page.mouse.down();
    await page.mouse.move(paneBox.x + paneBox.width - 4, paneBox.y + paneBox.height - 4, { steps: 8 });
    await page.mouse.up();
    await page.keyboard.up('Shift');
    await expect
      .poll(
        async () =>
          (
            await page.evaluate(() =>
              (window as unknown as { __loopwright: { getSelection(): { blocks: string[] } } }).__loopwright.getSelection(),
            )
          ).blocks.length,
      )
      .toBe(built.blocks.length);
    await page.keyboard.press('Escape');

    // Moving a block: by mouse drag (snapped to the grid), then by arrow key; one step each.
    const probeAt = () => getDiagram(page).then((d) => d.blocks.find((b) => b.id === 'probe1')!.position);
    await page.getByRole('button', { name: 'Fit to view' }).click();
    await page.waitForTimeout(300);
    const p0 = await probeAt();
    const card = (await page.locator('[data-block="probe1"]').boundingBox())!;
    const h1 = (await history(page)).past;
    await page.mouse.move(card.x + 20, card.y + 6);
    await page.mouse.down();
    await page.mouse.move(card.x + 60, card.y + 66, { steps: 6 });
    await page.mouse.up();
    await expect.poll(async () => (await probeAt()).y).toBeGreaterThan(p0.y);
    const p1 = await probeAt();
    expect(Math.abs(p1.x % 10) + Math.abs(p1.y % 10)).toBe(0);
    expect((await history(page)).past).toBe(h1 + 1);
    await page.keyboard.press('ArrowRight');
    await expect.poll(async () => (await probeAt()).x).toBeGreaterThan(p1.x);
    expect((await history(page)).past).toBe(h1 + 2);
    await page.keyboard.press('Control+z');
    await page.keyboard.press('Control+z');
    expect(await getDiagram(page)).toEqual(built);
  });

  it('the demo loads from the picker; screenshots in light and dark themes', async () => {
    await page.getByLabel('Load demo').selectOption('heating-cascade');
    await expect.poll(async () => (await getDiagram(page)).title).toMatch(/heat/i);
    await page.getByLabel('Load demo').selectOption('positioning-axis');
    await expect.poll(async () => (await getDiagram(page)).blocks.length).toBeGreaterThan(3);
    await page.waitForTimeout(400);
    const theme = await page.evaluate(() => document.documentElement.dataset.theme);
    if (theme === 'dark') await page.getByRole('button', { name: 'Switch to light theme' }).click();
    await page.waitForTimeout(150);
    await screenshot(page, 'editor-demo-light');
    await page.getByRole('button', { name: 'Switch to dark theme' }).click();
    await page.waitForTimeout(150);
    expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe('dark');
    await screenshot(page, 'editor-demo-dark');
    await page.getByRole('button', { name: 'About and safety', exact: true }).click();
    await expect.poll(() => page.getByRole('dialog', { name: 'About and safety' }).textContent()).toMatch(/functional-safety standards/);
    await screenshot(page, 'editor-about-dark');
    await page.getByRole('button', { name: 'Close About' }).click();
    await page.getByRole('button', { name: 'Switch to light theme' }).click();
  });
});
