import { useEffect, useState, type CSSProperties } from 'react';
import { ReactFlowProvider } from '@xyflow/react';
import { AnalysisArea } from './views/AnalysisArea.tsx';
import { Canvas } from './canvas/Canvas.tsx';
import { PartsPanel } from './panels/PartsPanel.tsx';
import { DetailsPanel } from './panels/DetailsPanel.tsx';
import { ParametersPanel } from './panels/ParametersPanel.tsx';
import { FindingsPanel } from './panels/FindingsPanel.tsx';
import { Toolbar } from './panels/Toolbar.tsx';
import { AboutDialog, SAFETY_TEXT } from './panels/AboutDialog.tsx';
import { installShortcuts } from './panels/shortcuts.ts';
import { useUiStore } from './store/ui-store.ts';
import { openFile } from './files/file-actions.ts';
import { KeptAutosaveNotice } from './files/KeptAutosaveNotice.tsx';
import { isTestLogFile, openTestLogFile } from './commission/commission-store.ts';

function NoticeBar() {
  const notice = useUiStore((s) => s.notice);
  useEffect(() => {
    if (notice?.kind !== 'info') return;
    const t = setTimeout(() => useUiStore.getState().notify(null), 3000);
    return () => clearTimeout(t);
  }, [notice]);
  if (!notice) return null;
  return (
    <div
      className={`notice ${notice.kind}`}
      role={notice.kind === 'error' ? 'alert' : 'status'}
      aria-label={notice.kind === 'error' ? 'Error' : 'Status'}
    >
      <span className="notice-title">{notice.title}</span>
      {notice.problems && (
        <ul>
          {notice.problems.map((p, i) => (
            <li key={i}>{p}</li>
          ))}
        </ul>
      )}
      <button type="button" className="icon" aria-label="Dismiss message" onClick={() => useUiStore.getState().notify(null)}>
        ×
      </button>
    </div>
  );
}

/** The bar between canvas and analysis views: drag it (or use the arrow keys) to share the height. */
function Splitter() {
  const h = useUiStore((s) => s.analysisHeight);
  const set = (px: number) => useUiStore.getState().setAnalysisHeight(Math.round(Math.min(Math.max(px, 60), window.innerHeight - 220)));
  const current = () => h ?? document.querySelector('.analysis')?.getBoundingClientRect().height ?? 300;
  return (
    <div
      className="splitter"
      role="separator"
      aria-orientation="horizontal"
      aria-label="Resize analysis area"
      tabIndex={0}
      onPointerDown={(e) => {
        const el = e.currentTarget;
        el.setPointerCapture(e.pointerId);
        const startY = e.clientY;
        const start = current();
        const move = (ev: PointerEvent) => set(start + (startY - ev.clientY));
        const up = () => {
          el.removeEventListener('pointermove', move);
          el.removeEventListener('pointerup', up);
        };
        el.addEventListener('pointermove', move);
        el.addEventListener('pointerup', up);
      }}
      onDoubleClick={() => useUiStore.getState().setAnalysisHeight(null)}
      onKeyDown={(e) => {
        if (e.key === 'ArrowUp') set(current() + 30);
        if (e.key === 'ArrowDown') set(current() - 30);
      }}
    />
  );
}

/**
 * The editor layout: top bar, Parts (left), canvas (centre), Details / Parameters / Findings
 * (right), the analysis views (bottom, from views/AnalysisArea) and a footer with the caution.
 */
export function App() {
  const theme = useUiStore((s) => s.theme);
  const collapsed = useUiStore((s) => s.analysisCollapsed);
  const analysisHeight = useUiStore((s) => s.analysisHeight);
  const [dropping, setDropping] = useState(false);
  useEffect(() => {
    document.documentElement.dataset.theme = theme;
  }, [theme]);
  useEffect(() => installShortcuts(), []);
  return (
    <ReactFlowProvider>
      <div
        className={`app${collapsed ? ' analysis-collapsed' : ''}${dropping ? ' is-dropping' : ''}`}
        style={analysisHeight ? ({ '--analysis-height': `${analysisHeight}px` } as CSSProperties) : undefined}
        onDragOver={(e) => {
          if (e.dataTransfer.types.includes('Files')) {
            e.preventDefault();
            setDropping(true);
          }
        }}
        onDragLeave={(e) => {
          if (e.currentTarget === e.target) setDropping(false);
        }}
        onDrop={(e) => {
          setDropping(false);
          const f = e.dataTransfer.files?.[0];
          if (f) {
            e.preventDefault();
            if (isTestLogFile(f.name)) void openTestLogFile(f);
            else void openFile(f);
          }
        }}
      >
        <Toolbar />
        <PartsPanel />
        <main className="canvas" aria-label="Diagram">
          <Canvas />
          <NoticeBar />
          <KeptAutosaveNotice />
        </main>
        <aside className="side" aria-label="Inspector">
          <DetailsPanel />
          <ParametersPanel />
          <FindingsPanel />
        </aside>
        <section className="analysis" aria-label="Analysis">
          <Splitter />
          {/* Keyed on the theme: the charts are rebuilt in the new colours. */}
          <AnalysisArea key={theme} />
        </section>
        <footer className="footer">
          <span>Results are design aids — validate on the real plant with limits and interlocks in place.</span>
          <button
            type="button"
            aria-label="About and safety (footer)"
            title={SAFETY_TEXT}
            onClick={() => useUiStore.getState().setAboutOpen(true)}
          >
            About &amp; safety
          </button>
        </footer>
        <AboutDialog />
      </div>
    </ReactFlowProvider>
  );
}
