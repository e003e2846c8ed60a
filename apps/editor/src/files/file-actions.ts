/**
 * New / open / save. Opening validates the whole file first: a file that fails opens nothing,
 * leaves the current work untouched and says why. New and open are undoable edits.
 */
import { useDiagramStore } from '../store/diagram-store.ts';
import { emptyDiagram, parseDocument, serializeDocument, demos, type Diagram } from '../store/graph-bridge.ts';
import { useUiStore } from '../store/ui-store.ts';

export const MAX_FILE_BYTES = 5_000_000;

function replaceDocument(d: Diagram) {
  useDiagramStore.getState().setDiagram(d);
  useUiStore.getState().requestFit();
}

export function newDiagram(): void {
  replaceDocument(emptyDiagram());
  useUiStore.getState().notify(null);
}

export function loadDemo(id: string): void {
  const demo = demos().find((d) => d.id === id);
  if (!demo) return;
  replaceDocument(JSON.parse(JSON.stringify(demo.diagram)));
  useUiStore.getState().notify(null);
}

/** Opens a diagram from text; returns true when it loaded. */
export function openText(text: string, name: string): boolean {
  try {
    const d = parseDocument(text);
    replaceDocument(d);
    useUiStore.getState().notify({ kind: 'info', title: `Opened ${name}` });
    return true;
  } catch (err) {
    const e = err as Error & { problems?: string[] };
    const problems = Array.isArray(e.problems) && e.problems.length > 1 ? e.problems.slice(0, 12) : undefined;
    useUiStore.getState().notify({ kind: 'error', title: `Could not open ${name}: ${e.message}`, problems });
    return false;
  }
}

export async function openFile(file: File): Promise<boolean> {
  if (file.size > MAX_FILE_BYTES) {
    useUiStore
      .getState()
      .notify({ kind: 'error', title: `Could not open ${file.name}: the file is larger than ${MAX_FILE_BYTES / 1e6} MB` });
    return false;
  }
  return openText(await file.text(), file.name);
}

export function fileNameFor(d: Diagram): string {
  const slug =
    d.title
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, '-')
      .replace(/^-|-$/g, '') || 'diagram';
  return `${slug}.loop.json`;
}

export function saveDiagram(): void {
  const d = useDiagramStore.getState().diagram;
  downloadText(serializeDocument(d), fileNameFor(d));
}

/** Offers `text` as a file download named `name`, byte for byte. */
export function downloadText(text: string, name: string): void {
  const blob = new Blob([text], { type: 'application/json' });
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
