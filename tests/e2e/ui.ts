/**
 * Steps a user takes in the editor, for the browser tests: wiring with the mouse, selecting a
 * block, typing into a field, and reading the document and history through the test hook
 * (`window.__loopwright`, read only).
 */
import type { Page } from 'playwright-core';
import type { Diagram } from '@loopwright/graph';

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
