/**
 * Steps a user takes in the editor, for the browser tests: wiring with the mouse, selecting a
 * block, typing into a field, and reading the document and history through the test hook
 * (`window.__loopwright`, read only).
 */
import type { Page } from 'playwright-core';
import type { Diagram } from '@loopwright/graph';
import { expect } from 'vitest';
import { pathPoints, type Point } from '@loopwright/editor/testing';

type Hook = {
  getDiagram(): Diagram;
  getSelection(): { blocks: string[]; wires: string[] };
  historySize(): { past: number; future: number };
};
export const getDiagram = (page: Page) => page.evaluate(() => (window as unknown as { __loopwright: Hook }).__loopwright.getDiagram());
export const history = (page: Page) => page.evaluate(() => (window as unknown as { __loopwright: Hook }).__loopwright.historySize());
export const getSelection = (page: Page) => page.evaluate(() => (window as unknown as { __loopwright: Hook }).__loopwright.getSelection());

/** Drag from one port to another with the mouse (React Flow connects on release over a handle). */
export async function wire(page: Page, from: string, to: string) {
  const a = await page.getByTestId(`port-${from}`).boundingBox();
  const b = await page.getByTestId(`port-${to}`).boundingBox();
  if (!a || !b) throw new Error(`port not visible: ${from} or ${to}`);
  await page.mouse.move(a.x + a.width / 2, a.y + a.height / 2);
  await page.mouse.down();
  await page.mouse.move((a.x + b.x) / 2, (a.y + b.y) / 2 + 10, { steps: 4 });
  await page.mouse.move(b.x + b.width / 2, b.y + b.height / 2, { steps: 4 });
  await page.mouse.up();
}

export async function selectBlock(page: Page, id: string) {
  // Click the card's title strip (not a port), as a user would.
  await page.locator(`[data-block="${id}"]`).click({ position: { x: 24, y: 8 } });
}

export async function setField(page: Page, label: string, text: string) {
  const f = page.getByLabel(label, { exact: true });
  await f.click();
  await f.press('Control+a');
  await f.pressSequentially(text);
  await f.press('Enter');
}

// Canvas geometry as the browser draws it (shared by the canvas and display tests).

export interface Rect {
  left: number;
  top: number;
  right: number;
  bottom: number;
}
export const intersects = (a: Rect, b: Rect) => a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;

/** The drawn path of a wire, in flow units (the `d` WireEdge draws). */
export async function wirePath(page: Page, id: string): Promise<Point[]> {
  const d = await page.locator(`[data-testid="rf__edge-${id}"] path.react-flow__edge-path`).getAttribute('d');
  if (!d) throw new Error(`wire ${id} not drawn`);
  return pathPoints(d);
}

/** The horizontal return segment of a feedback wire: its longest horizontal piece. */
export function lane(pts: Point[]): { y: number; x0: number; x1: number } {
  let best = { y: Number.NaN, x0: 0, x1: 0 };
  for (let i = 0; i + 1 < pts.length; i++) {
    const a = pts[i];
    const b = pts[i + 1];
    if (Math.abs(a.y - b.y) < 1e-6 && Math.abs(b.x - a.x) > best.x1 - best.x0)
      best = { y: a.y, x0: Math.min(a.x, b.x), x1: Math.max(a.x, b.x) };
  }
  return best;
}

/** Screen point at fraction f along a wire's longest horizontal segment (f along its length). */
export async function pointOnWire(page: Page, id: string, f: number): Promise<{ x: number; y: number }> {
  const l = lane(await wirePath(page, id));
  return toScreen(page, { x: l.x0 + f * (l.x1 - l.x0), y: l.y });
}

/** Flow coordinates → page coordinates, through the viewport transform React Flow applies. */
export async function toScreen(page: Page, p: Point): Promise<{ x: number; y: number }> {
  return page.evaluate(
    ([x, y]) => {
      const vp = document.querySelector('.react-flow__viewport') as HTMLElement;
      const m = new DOMMatrix(getComputedStyle(vp).transform);
      const r = (document.querySelector('.react-flow') as HTMLElement).getBoundingClientRect();
      return { x: r.left + m.a * x + m.e, y: r.top + m.d * y + m.f };
    },
    [p.x, p.y],
  );
}

/** Waits until the canvas stops moving (a fit after Tidy or a load runs a frame or two later). */
export async function viewSettled(page: Page) {
  await page.waitForSelector('.canvas-box:not([data-fit-pending])', { timeout: 20_000 });
  const transform = () => page.evaluate(() => (document.querySelector('.react-flow__viewport') as HTMLElement).style.transform);
  let last = '';
  await expect
    .poll(
      async () => {
        const now = await transform();
        const same = now === last;
        last = now;
        return same;
      },
      { interval: 250 },
    )
    .toBe(true);
}

export const rectOf = (page: Page, selector: string) =>
  page.locator(selector).evaluateAll((els) =>
    els.map((e) => {
      const r = e.getBoundingClientRect();
      return { left: r.left, top: r.top, right: r.right, bottom: r.bottom };
    }),
  );

// The analysis views through the test hook (`window.__loopwright.analysis`, read only).

/** What the analysis hook reports now (the caller names the fields it reads). */
export const analysisState = <T>(page: Page) =>
  page.evaluate(() =>
    (window as unknown as { __loopwright: { analysis: { state(): unknown } } }).__loopwright.analysis.state(),
  ) as Promise<T>;

/** Waits until every view has drawn the results of the latest input change (poles and a run in). */
export async function analysisSettled<T>(page: Page, timeout = 30_000): Promise<T> {
  await page.waitForFunction(
    () => {
      const h = (
        window as unknown as { __loopwright?: { analysis?: { state(): { complete: boolean; poles: unknown; response: unknown } } } }
      ).__loopwright?.analysis;
      if (!h) return false;
      const s = h.state();
      return s.complete && s.poles !== null && s.response !== null;
    },
    undefined,
    { timeout, polling: 50 },
  );
  return analysisState<T>(page);
}

/** Replaces the document through the test hook (for tests about views, not about building). */
export async function loadDiagram(page: Page, d: Diagram) {
  await page.evaluate((doc) => (window as unknown as { __loopwright: { setDiagram(d: unknown): void } }).__loopwright.setDiagram(doc), d);
}
