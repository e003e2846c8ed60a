import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openEditor, screenshot, type EditorSession } from './harness.ts';

describe('editor', () => {
  let s: EditorSession;
  beforeAll(async () => {
    s = await openEditor();
  });
  afterAll(async () => {
    await s?.close();
  });
  it('loads with the test hook', async () => {
    const d = await s.page.evaluate(() => (window as any).__loopwright.getDiagram());
    expect(d.format).toBe('loopwright.diagram');
    await screenshot(s.page, 'smoke');
  });
});
