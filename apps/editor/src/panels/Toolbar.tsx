/** The top bar: file commands, demos, undo/redo, layout and view, theme, About & safety. */
import { useRef, useState } from 'react';
import { useReactFlow } from '@xyflow/react';
import { useStore } from 'zustand';
import { redo, undo, useDiagramStore } from '../store/diagram-store.ts';
import { demos } from '../store/graph-bridge.ts';
import { useUiStore } from '../store/ui-store.ts';
import { loadDemo, newDiagram, openFile, saveDiagram } from '../files/file-actions.ts';
import { tidyPositions } from '../canvas/tidy.ts';
import { demoTestLogs } from '@loopwright/study';
import { openSampleLog } from '../commission/commission-store.ts';

/** Demo-picker values that open a sample test log rather than a diagram. */
const SAMPLE_LOG = 'log:';

export async function tidyLayout(getSizes: () => Record<string, { width: number; height: number }>): Promise<void> {
  const d = useDiagramStore.getState().diagram;
  const positions = await tidyPositions(d, getSizes());
  useDiagramStore.getState().moveBlocks(positions);
}

export function Toolbar() {
  const title = useDiagramStore((s) => s.diagram.title);
  const canUndo = useStore(useDiagramStore.temporal, (t) => t.pastStates.length > 0);
  const canRedo = useStore(useDiagramStore.temporal, (t) => t.futureStates.length > 0);
  const theme = useUiStore((s) => s.theme);
  const fileInput = useRef<HTMLInputElement>(null);
  const flow = useReactFlow();
  const [busy, setBusy] = useState(false);
  const list = demos();
  return (
    <header className="topbar" role="toolbar" aria-label="Diagram commands">
      <span className="brand">Loopwright</span>
      <input
        className="title-input"
        aria-label="Diagram title"
        key={title}
        defaultValue={title}
        onBlur={(e) => e.target.value.trim() && e.target.value !== title && useDiagramStore.getState().setTitle(e.target.value.trim())}
        onKeyDown={(e) => e.key === 'Enter' && (e.target as HTMLInputElement).blur()}
      />
      <span className="sep" />
      <button type="button" aria-label="New diagram" title="New diagram" onClick={newDiagram}>
        New
      </button>
      <button
        type="button"
        aria-label="Open diagram"
        title="Open a .loop.json file (or drop it on the window)"
        onClick={() => fileInput.current?.click()}
      >
        Open…
      </button>
      <input
        ref={fileInput}
        type="file"
        accept=".json,.loop.json,application/json"
        hidden
        aria-label="Diagram file"
        data-testid="open-file-input"
        onChange={(e) => {
          const f = e.target.files?.[0];
          e.target.value = '';
          if (f) void openFile(f);
        }}
      />
      <button type="button" aria-label="Save diagram" title="Save as .loop.json (Ctrl+S)" onClick={saveDiagram}>
        Save
      </button>
      <select
        aria-label="Load demo"
        value=""
        onChange={(e) => {
          const v = e.target.value;
          if (v.startsWith(SAMPLE_LOG)) void openSampleLog(v.slice(SAMPLE_LOG.length));
          else if (v) loadDemo(v);
        }}
      >
        <option value="">Demos…</option>
        {list.map((d) => (
          <option key={d.id} value={d.id}>
            {d.title}
          </option>
        ))}
        <optgroup label="Sample test logs">
          {demoTestLogs.map((d) => (
            <option key={d.id} value={`${SAMPLE_LOG}${d.id}`}>
              {d.title}
            </option>
          ))}
        </optgroup>
      </select>
      <span className="sep" />
      <button type="button" aria-label="Undo" title="Undo (Ctrl+Z)" disabled={!canUndo} onClick={undo}>
        ↶ Undo
      </button>
      <button type="button" aria-label="Redo" title="Redo (Ctrl+Shift+Z / Ctrl+Y)" disabled={!canRedo} onClick={redo}>
        ↷ Redo
      </button>
      <span className="sep" />
      <button
        type="button"
        aria-label="Tidy layout"
        title="Arrange the blocks left to right"
        disabled={busy}
        onClick={async () => {
          setBusy(true);
          try {
            await tidyLayout(() => {
              const out: Record<string, { width: number; height: number }> = {};
              for (const n of flow.getNodes()) out[n.id] = { width: n.measured?.width ?? 140, height: n.measured?.height ?? 70 };
              return out;
            });
            useUiStore.getState().requestFit();
          } finally {
            setBusy(false);
          }
        }}
      >
        Tidy
      </button>
      <button
        type="button"
        aria-label="Fit to view"
        title="Show the whole diagram, every block and wire (zoom in with the wheel or +)"
        onClick={() => useUiStore.getState().requestFit()}
      >
        Fit
      </button>
      <span className="spacer" />
      <button
        type="button"
        aria-label={theme === 'dark' ? 'Switch to light theme' : 'Switch to dark theme'}
        title="Light / dark theme"
        onClick={() => useUiStore.getState().setTheme(theme === 'dark' ? 'light' : 'dark')}
      >
        {theme === 'dark' ? '☀ Light' : '☾ Dark'}
      </button>
      <button type="button" aria-label="About and safety" onClick={() => useUiStore.getState().setAboutOpen(true)}>
        About &amp; safety
      </button>
    </header>
  );
}
