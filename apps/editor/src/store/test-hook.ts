/**
 * `window.__loopwright`: a small, stable hook for browser tests and for poking at the editor
 * from the devtools console. It reads and writes the same store the UI uses.
 */
import { useDiagramStore, undo, redo } from './diagram-store.ts';
import type { Diagram } from './graph-bridge.ts';

export interface LoopwrightHook {
  getDiagram(): Diagram;
  setDiagram(d: Diagram): void;
  getSelection(): { blocks: string[]; wires: string[] };
  undo(): void;
  redo(): void;
  historySize(): { past: number; future: number; tracking: boolean };
}

export function installTestHook(): void {
  const hook: LoopwrightHook = {
    getDiagram: () => JSON.parse(JSON.stringify(useDiagramStore.getState().diagram)),
    setDiagram: (d) => useDiagramStore.getState().setDiagram(d),
    getSelection: () => JSON.parse(JSON.stringify(useDiagramStore.getState().selection)),
    undo,
    redo,
    historySize: () => {
      const t = useDiagramStore.temporal.getState();
      return { past: t.pastStates.length, future: t.futureStates.length, tracking: t.isTracking };
    },
  };
  (window as unknown as { __loopwright: LoopwrightHook }).__loopwright = hook;
}
