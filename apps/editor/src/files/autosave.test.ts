import { afterEach, describe, expect, it } from 'vitest';
import { AUTOSAVE_KEY, KEPT_PREFIX, bootDocument, discardKept, keptText, useKeptAutosaves, type StorageLike } from './autosave.ts';
import { useDiagramStore } from '../store/diagram-store.ts';
import { defaultDemo, emptyDiagram, serializeDocument } from '../store/graph-bridge.ts';

/** An in-memory Storage; `quota` (characters) makes setItem throw as a full browser storage does. */
function memoryStorage(quota = Infinity): StorageLike & { map: Map<string, string> } {
  const map = new Map<string, string>();
  const used = () => [...map].reduce((n, [k, v]) => n + k.length + v.length, 0);
  return {
    map,
    get length() {
      return map.size;
    },
    key: (i: number) => [...map.keys()][i] ?? null,
    getItem: (k: string) => map.get(k) ?? null,
    setItem: (k: string, v: string) => {
      if (used() - (map.get(k)?.length ?? 0) + v.length > quota) throw new Error('QuotaExceededError');
      map.set(k, v);
    },
    removeItem: (k: string) => void map.delete(k),
  };
}

const newer = () => serializeDocument(emptyDiagram()).replace(/"version": *\d+/, '"version": 999');

// Nothing the user made is lost (the project's rule); an edit after a failed restore must not
// overwrite the unreadable text (issue 10 item 9).
describe('autosave', () => {
  let stop: (() => void) | undefined;
  afterEach(() => stop?.());

  it('restores a readable autosave and saves every edit', () => {
    const s = memoryStorage();
    const d = { ...emptyDiagram(), title: 'saved before' };
    s.setItem(AUTOSAVE_KEY, serializeDocument(d));
    stop = bootDocument(s, 1000);
    expect(useDiagramStore.getState().diagram.title).toBe('saved before');
    useDiagramStore.getState().setTitle('edited');
    expect(JSON.parse(s.getItem(AUTOSAVE_KEY)!).title).toBe('edited');
    expect(useKeptAutosaves.getState().items).toEqual([]);
  });

  for (const [what, text] of [
    ['a newer format version', newer()],
    ['damaged text', '{"format": "loopwright.diagram", "blocks": [ {'],
  ] as const) {
    it(`${what}: kept aside byte for byte, the demo opens, and the first edit does not overwrite it`, () => {
      expect(text).not.toBe('');
      const s = memoryStorage();
      s.setItem(AUTOSAVE_KEY, text);
      stop = bootDocument(s, 1234);
      expect(useDiagramStore.getState().diagram).toEqual(defaultDemo());
      const [item] = useKeptAutosaves.getState().items;
      expect(item.key).toBe(`${KEPT_PREFIX}1234`);
      expect(item.reason.length).toBeGreaterThan(5);
      if (what === 'a newer format version') expect(item.reason).toMatch(/newer/);
      expect(keptText(item)).toBe(text);
      useDiagramStore.getState().setTitle('first edit');
      useDiagramStore.getState().setTitle('second edit');
      expect(s.getItem(item.key)).toBe(text);
      expect(JSON.parse(s.getItem(AUTOSAVE_KEY)!).title).toBe('second edit');
      // A second start still offers it (and does not keep the now readable autosave aside).
      stop();
      stop = bootDocument(s, 5678);
      expect(useKeptAutosaves.getState().items.map((x) => x.key)).toEqual([item.key]);
      expect(useDiagramStore.getState().diagram.title).toBe('second edit');
      discardKept(item);
      expect(s.getItem(item.key)).toBeNull();
      expect(useKeptAutosaves.getState().items).toEqual([]);
    });
  }

  it('when storage is too full to keep a copy, the text stays where it is and autosave pauses until it is dealt with', () => {
    // Larger than the demo (so the demo fits once it is discarded), too large to be stored twice.
    const text = newer().replace('"description": ""', `"description": "${'x'.repeat(serializeDocument(defaultDemo()).length)}"`);
    expect(text.length).toBeGreaterThan(serializeDocument(defaultDemo()).length + 100);
    const s = memoryStorage(AUTOSAVE_KEY.length + text.length + 10);
    s.setItem(AUTOSAVE_KEY, text);
    stop = bootDocument(s, 1);
    expect(useKeptAutosaves.getState().paused).toBe(true);
    const [item] = useKeptAutosaves.getState().items;
    expect(item.key).toBe(AUTOSAVE_KEY);
    useDiagramStore.getState().setTitle('edit while paused');
    expect(s.getItem(AUTOSAVE_KEY)).toBe(text);
    expect([...s.map.keys()]).toEqual([AUTOSAVE_KEY]);
    discardKept(item);
    expect(useKeptAutosaves.getState().paused).toBe(false);
    expect(JSON.parse(s.getItem(AUTOSAVE_KEY)!).title).toBe('edit while paused');
  });

  it('without storage the demo opens and editing works', () => {
    stop = bootDocument(null);
    expect(useDiagramStore.getState().diagram).toEqual(defaultDemo());
    useDiagramStore.getState().setTitle('x');
    expect(useKeptAutosaves.getState().items).toEqual([]);
  });
});
