/**
 * Autosave: every document change is written to localStorage, so a reload or a crash loses
 * nothing. On start the saved diagram is restored if it still validates; otherwise the
 * default demo is loaded.
 */
import { loadDocument, useDiagramStore } from '../store/diagram-store.ts';
import { defaultDemo, parseDocument, serializeDocument } from '../store/graph-bridge.ts';

export const AUTOSAVE_KEY = 'loopwright.autosave';

export function bootDocument(): void {
  let restored = false;
  try {
    const text = localStorage.getItem(AUTOSAVE_KEY);
    if (text) {
      loadDocument(parseDocument(text));
      restored = true;
    }
  } catch {
    // A saved document that no longer validates is left in place (not overwritten until an edit) and the demo loads.
  }
  if (!restored) loadDocument(defaultDemo());
  let last = useDiagramStore.getState().diagram;
  useDiagramStore.subscribe((s) => {
    if (s.diagram === last) return;
    last = s.diagram;
    try {
      localStorage.setItem(AUTOSAVE_KEY, serializeDocument(s.diagram));
    } catch {
      // Storage full or disabled: the editor keeps working; saving to a file still works.
    }
  });
}
