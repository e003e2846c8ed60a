/**
 * Canvas wiring, the Parameters panel and autosave in the browser (issue 11 items 6 and 7,
 * issue 10 item 9). A three-loop motor-drive cascade (current PI, speed PI, position P) is
 * built through the UI only — Parts, mouse wiring, Tidy, cuts in Details — and then: nested
 * feedback wires on separate lanes with their cut markers apart, blocks dropped on wires,
 * a wire drawn onto a used input, a long label, Fit, engineering notation and one undo step
 * per slider drag or run of nudges. `window.__loopwright` is only READ.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoDiagrams, serializeDiagram, type Diagram } from '@loopwright/graph';
import { roundSignificant } from '@loopwright/lti';
import { openEditor, screenshot, type EditorSession } from './harness.ts';
import {
  getDiagram,
  getSelection,
  history,
  intersects,
  lane,
  pointOnWire,
  rectOf,
  selectBlock,
  setField,
  toScreen,
  viewSettled,
  wire,
  wirePath,
  type Rect,
} from './ui.ts';
import { LANE_GAP } from '@loopwright/editor/testing';

const inside = (a: Rect, outer: Rect, slack = 1) =>
  a.left >= outer.left - slack && a.right <= outer.right + slack && a.top >= outer.top - slack && a.bottom <= outer.bottom + slack;

/** Everything drawn on the canvas (cards, junctions, wires, cut markers) lies inside the canvas. */
async function expectAllInView(page: Page, what: string) {
  const [view] = await rectOf(page, '.react-flow');
  const parts = [
    ...(await rectOf(page, '.react-flow__node')),
    ...(await rectOf(page, 'path.react-flow__edge-path')),
    ...(await rectOf(page, '.lw-cut')),
  ];
  expect(parts.length).toBeGreaterThan(3);
  for (const p of parts) expect(inside(p, view), `${what}: ${JSON.stringify(p)} inside ${JSON.stringify(view)}`).toBe(true);
}

const demo = (id: string): Diagram => JSON.parse(JSON.stringify(demoDiagrams.find((x) => x.id === id)!.diagram)) as Diagram;

describe('canvas: the demo at start', () => {
  it('the demo is fitted whole at start, and again by Fit after zooming in', async () => {
    const s = await openEditor({ width: 1280, height: 800 });
    try {
      const page = s.page;
      expect((await getDiagram(page)).title).toBe(demo('positioning-axis').title);
      await expect.poll(() => page.locator('.lw-cut').count()).toBe(demo('positioning-axis').cuts.length);
      await page.waitForTimeout(400);
      await viewSettled(page);
      await expectAllInView(page, 'at start');
      await screenshot(page, 'canvas-demo-start');
      for (let i = 0; i < 4; i++) await page.getByRole('button', { name: 'Zoom In' }).click();
      await page.waitForTimeout(200);
      const [view] = await rectOf(page, '.react-flow');
      const outside = (await rectOf(page, '.react-flow__node')).filter((r) => !inside(r, view));
      expect(outside.length, 'zoomed in, some blocks are out of view').toBeGreaterThan(0);
      await page.getByRole('button', { name: 'Fit to view' }).click();
      await page.waitForTimeout(400);
      await viewSettled(page);
      await expectAllInView(page, 'after Fit');
    } finally {
      await s.close();
    }
  });
});

describe('canvas: a three-loop cascade built through the UI', () => {
  let s: EditorSession;
  let page: Page;
  const downloads = mkdtempSync(join(tmpdir(), 'loopwright-canvas-dl-'));

  beforeAll(async () => {
    s = await openEditor({ width: 1440, height: 900 });
    page = s.page;
    page.setDefaultTimeout(8000);
  });
  afterAll(async () => {
    await s?.close();
    rmSync(downloads, { recursive: true, force: true });
  });

  /** Feedback wires of the cascade: current (inner), speed, position (outer). */
  const FEEDBACK = { current: 'w12', speed: 'w13', position: 'w14' } as const;

  it('builds it with Parts, the mouse and Tidy; nested feedback wires get separate lanes and their cut markers stay apart', async () => {
    await page.getByRole('button', { name: 'New diagram' }).click();
    await viewSettled(page);
    const parts = [
      'Source',
      'Summing junction',
      'Gain',
      'Summing junction',
      'PID controller',
      'Summing junction',
      'PID controller',
      'First-order lag',
      'Gain',
      'First-order lag',
      'Integrator',
      'Probe',
    ];
    for (const p of parts) await page.getByRole('button', { name: `Add ${p}`, exact: true }).click();
    await page.getByRole('button', { name: 'Fit to view' }).click();
    await page.waitForTimeout(300);
    await viewSettled(page);
    const chain = ['src1', 'sum1', 'gain1', 'sum2', 'pid1', 'sum3', 'pid2', 'lag1', 'gain2', 'lag2', 'int1', 'probe1'];
    expect((await getDiagram(page)).blocks.map((b) => b.id)).toEqual(chain);
    const input = (id: string) => (id.startsWith('sum') ? 'in1' : 'in');
    for (let i = 0; i + 1 < chain.length; i++) await wire(page, `${chain[i]}-out`, `${chain[i + 1]}-${input(chain[i + 1])}`);
    // The three feedback paths, each into its junction's lower input.
    await wire(page, 'lag1-out', 'sum3-in2'); // winding current → current error
    await wire(page, 'lag2-out', 'sum2-in2'); // motor speed → speed error
    await wire(page, 'int1-out', 'sum1-in2'); // position → position error
    let d = await getDiagram(page);
    expect(d.wires).toHaveLength(14);
    expect(d.wires.slice(11).map((w) => `${w.id}:${w.from.block}->${w.to.block}.${w.to.port}`)).toEqual([
      `${FEEDBACK.current}:lag1->sum3.in2`,
      `${FEEDBACK.speed}:lag2->sum2.in2`,
      `${FEEDBACK.position}:int1->sum1.in2`,
    ]);
    // Block data of an ordinary drive (invented numbers): winding 1/(1.2 Ω) with 2.5 ms, inertia lag 1 s.
    await selectBlock(page, 'lag1');
    await setField(page, 'Time constant tau', '0.0025');
    await selectBlock(page, 'pid1');
    await setField(page, 'Label', 'speed controller (PI) with a deliberately long label');

    await page.getByRole('button', { name: 'Tidy layout' }).click();
    await expect
      .poll(
        async () =>
          (await getDiagram(page)).blocks.find((b) => b.id === 'probe1')!.position.x >
          (await getDiagram(page)).blocks.find((b) => b.id === 'src1')!.position.x,
      )
      .toBe(true);
    await page.waitForTimeout(300);
    await viewSettled(page);

    // Cut each feedback wire from Details and name the loop.
    for (const [name, w] of Object.entries(FEEDBACK)) {
      const at = await pointOnWire(page, w, 0.3);
      await page.mouse.click(at.x, at.y);
      await expect.poll(async () => (await getSelection(page)).wires).toEqual([w]);
      await page.getByRole('button', { name: `Cut wire ${w}` }).click();
      await setField(page, 'Cut label', `${name} loop`);
    }
    d = await getDiagram(page);
    expect(d.cuts.map((c) => `${c.wire}:${c.label}`)).toEqual([
      `${FEEDBACK.current}:current loop`,
      `${FEEDBACK.speed}:speed loop`,
      `${FEEDBACK.position}:position loop`,
    ]);
    await page.locator('.react-flow__pane').click({ position: { x: 5, y: 5 } });
    await page.waitForTimeout(300);

    await checkLanes(page, 'after Tidy');
    await expectAllInView(page, 'after Tidy');
    await screenshot(page, 'canvas-cascade-tidy');

    // Move the position measurement's integrator down a little by mouse: the lanes follow, still apart.
    const card = (await page.locator('[data-block="int1"]').boundingBox())!;
    await page.mouse.move(card.x + 30, card.y + 6);
    await page.mouse.down();
    await page.mouse.move(card.x + 30, card.y + 46, { steps: 5 });
    await page.mouse.up();
    await page.waitForTimeout(300);
    await checkLanes(page, 'after a move');
  });

  /** Lanes: inner loop nearest, each one LANE_GAP apart where they run side by side; no lane through a card; markers apart. */
  async function checkLanes(page: Page, when: string) {
    const lanes = {
      current: lane(await wirePath(page, FEEDBACK.current)),
      speed: lane(await wirePath(page, FEEDBACK.speed)),
      position: lane(await wirePath(page, FEEDBACK.position)),
    };
    // Below the forward path, and nested: current innermost, position outermost.
    expect(lanes.current.y, when).toBeLessThan(lanes.speed.y);
    expect(lanes.speed.y, when).toBeLessThan(lanes.position.y);
    expect(lanes.speed.y - lanes.current.y, when).toBeGreaterThanOrEqual(LANE_GAP - 0.5);
    expect(lanes.position.y - lanes.speed.y, when).toBeGreaterThanOrEqual(LANE_GAP - 0.5);
    // Each loop's lane spans the loops inside it.
    expect(lanes.speed.x0 <= lanes.current.x0 && lanes.current.x1 <= lanes.speed.x1 + 1, when).toBe(true);
    expect(lanes.position.x0 <= lanes.speed.x0 && lanes.speed.x1 <= lanes.position.x1 + 1, when).toBe(true);
    // No lane runs through a card (screen rectangles of the cards against the lane lines).
    const cards = await rectOf(page, '.react-flow__node');
    for (const [name, l] of Object.entries(lanes)) {
      const a = await toScreen(page, { x: l.x0, y: l.y });
      const b = await toScreen(page, { x: l.x1, y: l.y });
      for (const c of cards)
        expect(intersects({ left: a.x, right: b.x, top: a.y - 0.5, bottom: a.y + 0.5 }, c), `${when}: ${name} lane through a card`).toBe(
          false,
        );
    }
    // The cut markers do not touch.
    const markers = await rectOf(page, '.lw-cut');
    expect(markers).toHaveLength(3);
    for (let i = 0; i < markers.length; i++)
      for (let j = i + 1; j < markers.length; j++)
        expect(intersects(markers[i], markers[j]), `${when}: cut markers ${i} and ${j} overlap`).toBe(false);
  }

  it('a relabelled block keeps its size: the long label is cut short, in full on hover', async () => {
    const before = (await page.locator('[data-block="pid1"]').boundingBox())!;
    const title = page.locator('[data-block="pid1"] .lw-card-title');
    expect(await title.getAttribute('title')).toBe('speed controller (PI) with a deliberately long label');
    expect(await title.evaluate((e) => e.scrollWidth > e.clientWidth)).toBe(true); // truncated on the card
    await selectBlock(page, 'pid1');
    await setField(page, 'Label', 'speed PI');
    await expect.poll(() => title.textContent()).toBe('speed PI');
    const after = (await page.locator('[data-block="pid1"]').boundingBox())!;
    expect(Math.abs(after.width - before.width)).toBeLessThan(0.5);
    expect(Math.abs(after.height - before.height)).toBeLessThan(0.5);
    await setField(page, 'Label', 'speed controller (PI) with an even longer label that goes on and on and on');
    const long = (await page.locator('[data-block="pid1"]').boundingBox())!;
    expect(Math.abs(long.width - before.width)).toBeLessThan(0.5);
    // It does not reach over its neighbours.
    const [me] = await rectOf(page, '[data-id="pid1"]');
    for (const other of ['sum2', 'sum3']) {
      const [r] = await rectOf(page, `[data-id="${other}"]`);
      expect(intersects(me, r), `pid1 over ${other}`).toBe(false);
    }
    await screenshot(page, 'canvas-long-label');
  });

  it('a part dropped on a wire goes into it as one undo step (a probe taps it; the cut stays)', async () => {
    const before = await getDiagram(page);
    const h = (await history(page)).past;
    await viewSettled(page);
    // A speed-sensor lag into the speed feedback wire, dropped on its lane away from the cut marker.
    const at = await pointOnWire(page, FEEDBACK.speed, 0.2);
    const pane = page.locator('.react-flow__pane');
    const box = (await pane.boundingBox())!;
    await page
      .getByRole('button', { name: 'Add First-order lag', exact: true })
      .dragTo(pane, { targetPosition: { x: at.x - box.x, y: at.y - box.y } });
    await expect.poll(async () => (await getDiagram(page)).blocks.length).toBe(before.blocks.length + 1);
    let d = await getDiagram(page);
    expect((await history(page)).past).toBe(h + 1);
    const lag = d.blocks.at(-1)!.id;
    expect(
      d.wires
        .filter((w) => w.from.block === lag || w.to.block === lag)
        .map((w) => `${w.id}:${w.from.block}.${w.from.port}->${w.to.block}.${w.to.port}`),
    ).toEqual([`${FEEDBACK.speed}:lag2.out->${lag}.in`, `w15:${lag}.out->sum2.in2`]);
    expect(d.cuts.find((c) => c.label === 'speed loop')!.wire).toBe(FEEDBACK.speed);
    await page.waitForTimeout(300);
    await screenshot(page, 'canvas-dropped-on-wire');
    await page.keyboard.press('Control+z');
    expect(await getDiagram(page)).toEqual(before);

    // A probe dropped on the speed error wire (sum2 → pid1) measures it.
    const sig = d.wires.find((w) => w.from.block === 'sum2' && w.to.block === 'pid1')!.id;
    const p = await pointOnWire(page, sig, 0.5);
    await page.getByRole('button', { name: 'Add Probe', exact: true }).dragTo(pane, { targetPosition: { x: p.x - box.x, y: p.y - box.y } });
    await expect.poll(async () => (await getDiagram(page)).blocks.length).toBe(before.blocks.length + 1);
    d = await getDiagram(page);
    const probe = d.blocks.at(-1)!.id;
    expect(d.wires.filter((w) => w.to.block === probe).map((w) => `${w.from.block}.${w.from.port}`)).toEqual(['sum2.out']);
    expect(d.wires.find((w) => w.id === sig)).toEqual(before.wires.find((w) => w.id === sig));
    expect((await history(page)).past).toBe(h + 1);
    await page.keyboard.press('Control+z');
    expect(await getDiagram(page)).toEqual(before);
  });

  it('an unwired block dragged onto a wire goes into it; the wire lights up before the drop', async () => {
    await page.getByRole('button', { name: 'Add Gain', exact: true }).click();
    await viewSettled(page);
    const before = await getDiagram(page);
    const g = before.blocks.at(-1)!.id;
    const h = (await history(page)).past;
    const target = before.wires.find((w) => w.from.block === 'gain2' && w.to.block === 'lag2')!.id;
    const card = (await page.locator(`[data-block="${g}"]`).boundingBox())!;
    const to = await pointOnWire(page, target, 0.5);
    await page.mouse.move(card.x + 20, card.y + 6);
    await page.mouse.down();
    await page.mouse.move((card.x + to.x) / 2, (card.y + to.y) / 2, { steps: 5 });
    await page.mouse.move(to.x, to.y, { steps: 5 });
    await expect.poll(() => page.locator(`[data-testid="rf__edge-${target}"] .is-drop-target`).count()).toBe(1);
    await screenshot(page, 'canvas-drag-onto-wire');
    await page.mouse.up();
    await expect.poll(async () => (await getDiagram(page)).wires.length).toBe(before.wires.length + 1);
    const d = await getDiagram(page);
    expect(d.wires.filter((w) => w.from.block === g || w.to.block === g).map((w) => `${w.from.block}->${w.to.block}`)).toEqual([
      `gain2->${g}`,
      `${g}->lag2`,
    ]);
    expect((await history(page)).past).toBe(h + 1);
    expect(await page.locator('.is-drop-target').count()).toBe(0);
    await page.keyboard.press('Control+z');
    expect(await getDiagram(page)).toEqual(before);
  });

  it('a wire drawn onto a connected input asks: Cancel keeps the old wire, Replace swaps it in one step', async () => {
    const before = await getDiagram(page);
    const g = before.blocks.at(-1)!.id; // the unwired gain of the previous step
    const h = (await history(page)).past;
    await wire(page, `${g}-out`, 'sum1-in1');
    const dialog = page.getByRole('dialog', { name: 'Replace wire?' });
    await expect.poll(() => dialog.isVisible()).toBe(true);
    expect(await dialog.textContent()).toMatch(/in1.*sum1.*src1/s);
    await screenshot(page, 'canvas-replace-wire-dialog');
    await dialog.getByRole('button', { name: 'Cancel: keep the existing wire' }).click();
    await expect.poll(() => dialog.isVisible()).toBe(false);
    expect(await getDiagram(page)).toEqual(before);
    expect((await history(page)).past).toBe(h);
    // Escape cancels too.
    await wire(page, `${g}-out`, 'sum1-in1');
    await expect.poll(() => dialog.isVisible()).toBe(true);
    await page.keyboard.press('Escape');
    await expect.poll(() => dialog.isVisible()).toBe(false);
    expect(await getDiagram(page)).toEqual(before);
    await wire(page, `${g}-out`, 'sum1-in1');
    await dialog.getByRole('button', { name: 'Replace the existing wire' }).click();
    const d = await getDiagram(page);
    expect(d.wires.filter((w) => w.to.block === 'sum1' && w.to.port === 'in1').map((w) => w.from.block)).toEqual([g]);
    expect((await history(page)).past).toBe(h + 1);
    await page.keyboard.press('Control+z');
    expect(await getDiagram(page)).toEqual(before);
    await page.keyboard.press('Control+z'); // the extra gain goes again
  });

  it('Parameters: engineering notation, units in full, 4-digit slider values, one undo step per drag or run of nudges', async () => {
    await page.getByRole('button', { name: 'Add parameter' }).click();
    await setField(page, 'Name of parameter p1', 'Ti_spd');
    const value = page.getByLabel('Value of Ti_spd', { exact: true });
    const shows = async (typed: string, want: string, stored: number) => {
      await setField(page, 'Value of Ti_spd', typed);
      await expect.poll(async () => (await getDiagram(page)).parameters.find((p) => p.name === 'Ti_spd')!.value).toBe(stored);
      await expect.poll(() => value.inputValue()).toBe(want);
      expect(await value.evaluate((e: HTMLInputElement) => e.scrollWidth <= e.clientWidth), `${want} fits its box`).toBe(true);
    };
    // The values that read "0.000" before (issue 11 item 7), and SI-prefixed input.
    await shows('5e-5', '50e-6', 5e-5);
    await shows('1e-6', '1e-6', 1e-6);
    await shows('-0.000123456789', '-123.5e-6', -0.000123456789);
    await shows('15m', '0.015', 0.015);
    await shows('2.2k', '2200', 2200);
    // Editing shows the exact value, not the rounded one.
    await value.click();
    await setField(page, 'Value of Ti_spd', '0.0123456789');
    await expect.poll(() => value.inputValue()).toBe('0.01235');
    await value.click();
    expect(await value.inputValue()).toBe('0.0123456789');
    await value.press('Escape');
    // A long unit stays readable in full.
    await setField(page, 'Unit of Ti_spd', 'rad/s per N·m');
    const unit = page.getByLabel('Unit of Ti_spd', { exact: true });
    expect(await unit.inputValue()).toBe('rad/s per N·m');
    expect(await unit.evaluate((e: HTMLInputElement) => e.scrollWidth <= e.clientWidth)).toBe(true);
    await screenshot(page, 'canvas-parameters');
    await setField(page, 'Unit of Ti_spd', 's');
    await setField(page, 'Value of Ti_spd', '0.015');
    await setField(page, 'Slider minimum of Ti_spd', '0.002');
    await setField(page, 'Slider maximum of Ti_spd', '0.2');

    const param = async () => (await getDiagram(page)).parameters.find((p) => p.name === 'Ti_spd')!.value;
    const digits = (v: number) => String(Math.abs(v)).split('e')[0].replace('.', '').replace(/^0+/, '').length;
    // A drag: one undo step, a 4-digit value.
    const slider = page.getByLabel('Slider for Ti_spd', { exact: true });
    const sb = (await slider.boundingBox())!;
    const h0 = (await history(page)).past;
    const v0 = await param();
    await page.mouse.move(sb.x + sb.width * 0.3, sb.y + sb.height / 2);
    await page.mouse.down();
    for (const f of [0.4, 0.55, 0.7, 0.83]) await page.mouse.move(sb.x + sb.width * f, sb.y + sb.height / 2, { steps: 3 });
    await page.mouse.up();
    const v1 = await param();
    expect(v1).not.toBe(v0);
    expect(digits(v1), `slider value ${v1}`).toBeLessThanOrEqual(4);
    expect(v1).toBe(roundSignificant(v1, 4));
    expect((await history(page)).past).toBe(h0 + 1);
    // A run of arrow-key nudges (the key held down: auto-repeat) is one undo step however slowly
    // a loaded machine delivers it; a tap after a pause is the next step.
    await slider.focus();
    for (let i = 0; i < 6; i++) await page.keyboard.down('ArrowRight'); // after the first, repeat = true
    await page.keyboard.up('ArrowRight');
    const v2 = await param();
    expect(v2).toBeGreaterThan(v1);
    expect(digits(v2)).toBeLessThanOrEqual(4);
    expect((await history(page)).past).toBe(h0 + 2);
    await page.waitForTimeout(1700); // longer than the run window (COALESCE_MS)
    await page.keyboard.press('ArrowLeft');
    expect((await history(page)).past).toBe(h0 + 3);
    await page.keyboard.press('Control+z');
    expect(await param()).toBe(v2);
    await page.keyboard.press('Control+z');
    expect(await param()).toBe(v1);
    await page.keyboard.press('Control+z');
    expect(await param()).toBe(v0);
  });

  it('the built cascade is a valid document', async () => {
    const d = await getDiagram(page);
    expect(d.blocks.map((b) => b.kind)).toEqual([
      'source',
      'summing-junction',
      'gain',
      'summing-junction',
      'pid',
      'summing-junction',
      'pid',
      'first-order-lag',
      'gain',
      'first-order-lag',
      'integrator',
      'probe',
    ]);
    expect(d.cuts).toHaveLength(3);
    expect(JSON.parse(serializeDiagram(d))).toBeTruthy();
  });
});

describe('autosave that cannot be loaded', () => {
  const downloads = mkdtempSync(join(tmpdir(), 'loopwright-kept-dl-'));
  afterAll(() => rmSync(downloads, { recursive: true, force: true }));
  const newer = () =>
    serializeDiagram({ ...demo('heating-cascade'), title: 'my work from a newer version' }).replace(/"version": *\d+/, '"version": 99');
  const damaged = () => serializeDiagram({ ...demo('heating-cascade'), title: 'my damaged work' }).slice(0, 900);
  const storage = (p: Page) =>
    p.evaluate(() =>
      Object.fromEntries(
        Object.keys(localStorage)
          .filter((k) => k.startsWith('loopwright.autosave'))
          .map((k) => [k, localStorage.getItem(k)]),
      ),
    );

  for (const [what, text] of [
    ['written by a newer version', newer],
    ['damaged', damaged],
  ] as const) {
    it(`${what}: kept aside, the demo opens, an edit leaves it alone, download gives its bytes, discard removes it`, async () => {
      const profile = mkdtempSync(join(tmpdir(), 'loopwright-kept-'));
      const first = await openEditor({ profileDir: profile });
      const original = text();
      await first.page.evaluate((t) => localStorage.setItem('loopwright.autosave', t), original);
      await first.close();
      const s2 = await openEditor({ profileDir: profile });
      const p = s2.page;
      try {
        const notice = p.getByRole('alertdialog', { name: 'Unreadable autosave kept aside' });
        await expect.poll(() => notice.count()).toBe(1);
        expect(await notice.textContent()).toMatch(what === 'damaged' ? /could not be opened/ : /newer Loopwright/);
        expect((await getDiagram(p)).title).toBe(demo('positioning-axis').title);
        let st = await storage(p);
        const kept = Object.keys(st).find((k) => k.startsWith('loopwright.autosave.kept.') && !k.endsWith('.reason'))!;
        expect(st[kept]).toBe(original);
        expect(st['loopwright.autosave']).toBeUndefined();
        await screenshot(p, `canvas-autosave-kept-${what === 'damaged' ? 'damaged' : 'newer'}`);
        // The first edits are saved as usual, never over the kept text.
        const titleBox = p.getByLabel('Diagram title');
        await titleBox.fill('demo, edited');
        await titleBox.press('Enter');
        await selectBlock(p, 'position-controller');
        await setField(p, 'Label', 'edited label');
        st = await storage(p);
        expect(st[kept]).toBe(original);
        expect(JSON.parse(st['loopwright.autosave']!).title).toBe('demo, edited');
        // Download: the kept text byte for byte.
        const [download] = await Promise.all([
          p.waitForEvent('download'),
          notice.getByRole('button', { name: 'Download the unreadable autosave' }).click(),
        ]);
        const path = join(downloads, download.suggestedFilename());
        await download.saveAs(path);
        expect(download.suggestedFilename()).toMatch(/^unreadable-autosave-.*\.loop\.json$/);
        expect(readFileSync(path, 'utf8')).toBe(original);
        // "Later" hides it for this session only.
        await notice.getByRole('button', { name: 'Decide later' }).click();
        expect(await notice.count()).toBe(0);
        await p.reload();
        await p.waitForFunction(() => Boolean((window as unknown as { __loopwright?: unknown }).__loopwright));
        await expect.poll(() => notice.count()).toBe(1);
        expect((await getDiagram(p)).title).toBe('demo, edited');
        // Discard asks once more, then removes it for good.
        await notice.getByRole('button', { name: 'Discard the unreadable autosave' }).click();
        await notice.getByRole('button', { name: 'Keep the unreadable autosave' }).click();
        expect((await storage(p))[kept]).toBe(original);
        await notice.getByRole('button', { name: 'Discard the unreadable autosave' }).click();
        await notice.getByRole('button', { name: 'Confirm discarding the unreadable autosave' }).click();
        expect(await notice.count()).toBe(0);
        expect(Object.keys(await storage(p))).toEqual(['loopwright.autosave']);
        await p.reload();
        await p.waitForFunction(() => Boolean((window as unknown as { __loopwright?: unknown }).__loopwright));
        await p.waitForTimeout(300);
        expect(await notice.count()).toBe(0);
        expect((await getDiagram(p)).title).toBe('demo, edited');
      } finally {
        await s2.close();
        rmSync(profile, { recursive: true, force: true });
      }
    });
  }
});
