/** Keyboard shortcuts for the editor (not while typing in a field, except Ctrl+S). */
import { redo, undo, useDiagramStore } from '../store/diagram-store.ts';
import { saveDiagram } from '../files/file-actions.ts';

function typing(t: EventTarget | null): boolean {
  const el = t as HTMLElement | null;
  if (!el || !el.tagName) return false;
  if (el.isContentEditable) return true;
  if (el.tagName === 'TEXTAREA' || el.tagName === 'SELECT') return true;
  if (el.tagName === 'INPUT') {
    const type = (el as HTMLInputElement).type;
    return type !== 'range' && type !== 'checkbox' && type !== 'button';
  }
  return false;
}

export function installShortcuts(): () => void {
  const onKey = (e: KeyboardEvent) => {
    const mod = e.ctrlKey || e.metaKey;
    const key = e.key.toLowerCase();
    if (mod && key === 's') {
      e.preventDefault();
      saveDiagram();
      return;
    }
    if (typing(e.target)) return;
    if ((e.target as HTMLElement | null)?.closest?.('dialog')) return;
    const st = useDiagramStore.getState();
    if (!mod && (e.key === 'Delete' || e.key === 'Backspace')) {
      e.preventDefault();
      st.deleteSelection();
    } else if (mod && key === 'z' && !e.shiftKey) {
      e.preventDefault();
      undo();
    } else if (mod && ((key === 'z' && e.shiftKey) || key === 'y')) {
      e.preventDefault();
      redo();
    } else if (mod && key === 'a') {
      e.preventDefault();
      st.selectAll();
    } else if (mod && key === 'c') {
      st.copySelection();
    } else if (mod && key === 'v') {
      e.preventDefault();
      st.paste();
    } else if (e.key === 'Escape') {
      st.setSelection({ blocks: [], wires: [] });
    }
  };
  window.addEventListener('keydown', onKey);
  return () => window.removeEventListener('keydown', onKey);
}
