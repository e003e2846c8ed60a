/**
 * The analysis area: the sweep bar on top, the Locus always on the left (it is what the
 * slider moves), and the Response, Frequency, Loops, Closed loop and Compare views in tabs on
 * the right; computations in progress with their Cancel above them. Starts the analysis driver
 * (document → worker → results) and the test hook.
 */
import { useEffect, useLayoutEffect, useMemo, useState } from 'react';
import './analysis.css';
import { requestReport, startAnalysisDriver } from '../analysis/driver.ts';
import { installAnalysisHook } from '../analysis/test-hook.ts';
import { useAnalysisStore, type AnalysisViewId } from '../analysis/analysis-store.ts';
import { resultsComplete, useResultsStore, type ResultsState } from '../analysis/results-store.ts';
import { useShallow } from 'zustand/react/shallow';
import { useDiagramStore } from '../store/diagram-store.ts';
import { download, slug } from '../analysis/export.ts';
import { useUiStore } from '../store/ui-store.ts';
import { BusyBar } from './BusyBar.tsx';
import { ClosedLoopView } from './ClosedLoopView.tsx';
import { SweepBar } from './SweepBar.tsx';
import { LocusView } from './LocusView.tsx';
import { ResponseView } from './ResponseView.tsx';
import { FrequencyView } from './FrequencyView.tsx';
import { LoopsView } from './LoopsView.tsx';
import { CompareView, pinCurrent } from './CompareView.tsx';
import { palette } from './palette.ts';
import { FitView } from '../commission/FitView.tsx';
import { TuneView } from '../commission/TuneView.tsx';
import { installCommissionHook } from '../commission/test-hook.ts';

const TABS: { id: Exclude<AnalysisViewId, 'locus'>; label: string }[] = [
  { id: 'response', label: 'Response' },
  { id: 'frequency', label: 'Frequency' },
  { id: 'loops', label: 'Loops' },
  { id: 'closed-loop', label: 'Closed loop' },
  { id: 'compare', label: 'Compare' },
  { id: 'fit', label: 'Test log' },
  { id: 'tune', label: 'Tune' },
];

/** Dark when the page shows the dark theme (the <html data-theme> the theme switch sets). */
function useDark(): boolean {
  const theme = useDiagramStore((s) => s.diagram.view.theme);
  const read = () => (typeof document !== 'undefined' ? document.documentElement.dataset.theme : undefined);
  const [attr, setAttr] = useState(read);
  useEffect(() => {
    const mo = new MutationObserver(() => setAttr(read()));
    mo.observe(document.documentElement, { attributes: true, attributeFilter: ['data-theme'] });
    return () => mo.disconnect();
  }, []);
  return (attr ?? theme) === 'dark';
}

/**
 * The design report of what the views show (sweep, live value): computed in the worker by the
 * study's report — the code `loopwright report` runs — with progress and Cancel, then offered
 * as a download.
 */
export async function exportReport(): Promise<void> {
  const d = useDiagramStore.getState().diagram;
  try {
    const r = await requestReport();
    download(`${slug(d.title)}-report.html`, r.html, 'text/html');
    if (r.problems.length)
      useUiStore.getState().notify({ kind: 'info', title: 'The report leaves out what could not be computed:', problems: r.problems });
  } catch (e) {
    useUiStore.getState().notify({ kind: 'error', title: `No report: ${e instanceof Error ? e.message : String(e)}` });
  }
}

/**
 * Records each complete generation as drawn: after the charts have been given their options,
 * one frame for the paint. A component of its own, so that a new generation (every slider
 * step) renders only it, not the analysis area and every view in it.
 */
function DrawnGenerations() {
  const results = useResultsStore(
    useShallow((s) => ({
      generation: s.generation,
      generationAt: s.generationAt,
      wanted: s.wanted,
      held: s.held,
      renderedGeneration: s.renderedGeneration,
    })),
  );
  useLayoutEffect(() => {
    if (!resultsComplete(results as ResultsState) || results.renderedGeneration === results.generation) return;
    const gen = results.generation;
    const at = results.generationAt;
    const raf = requestAnimationFrame(() => {
      const s = useResultsStore.getState();
      if (s.generation !== gen) return;
      const t = performance.now();
      const last = Math.max(s.arrivedAt.analysis, s.arrivedAt.loops, s.arrivedAt.response);
      useResultsStore.setState({
        renderedGeneration: gen,
        latencies: [...s.latencies.slice(-199), t - at],
        breakdown: [...s.breakdown.slice(-199), [Math.max(0, last - at), t - Math.max(last, at)]],
      });
    });
    return () => cancelAnimationFrame(raf);
  }, [results]);
  return null;
}

export function AnalysisArea() {
  const view = useAnalysisStore((s) => s.view);
  const setView = useAnalysisStore((s) => s.setView);
  const pinned = useAnalysisStore((s) => s.pinned);
  const dark = useDark();
  const pal = useMemo(() => palette(dark), [dark]);
  const tab = view === 'locus' ? 'response' : view;

  useEffect(() => startAnalysisDriver(), []);
  useEffect(() => installAnalysisHook(), []);
  useEffect(() => installCommissionHook(), []);

  return (
    <div className="lw-analysis" data-theme-dark={dark ? 'true' : 'false'}>
      <div
        className="lw-resize"
        role="separator"
        aria-orientation="horizontal"
        aria-label="Resize the analysis area"
        onPointerDown={(e) => {
          const app = (e.currentTarget as HTMLElement).closest('.app') as HTMLElement | null;
          if (!app) return;
          const startY = e.clientY;
          const area = (e.currentTarget.parentElement as HTMLElement).getBoundingClientRect().height;
          const move = (ev: PointerEvent) => {
            const h = Math.min(app.clientHeight - 160, Math.max(200, area + startY - ev.clientY));
            app.style.setProperty('--analysis-height', `${h}px`);
          };
          const up = () => {
            window.removeEventListener('pointermove', move);
            window.removeEventListener('pointerup', up);
          };
          window.addEventListener('pointermove', move);
          window.addEventListener('pointerup', up);
        }}
      />
      <SweepBar />
      <BusyBar />
      <div className="lw-analysis-body">
        <div className="lw-locus-pane">
          <LocusView pal={pal} />
        </div>
        <div className="lw-views-pane">
          <div className="lw-tabs" role="tablist" aria-label="Analysis views">
            {TABS.map((t) => (
              <button
                key={t.id}
                type="button"
                role="tab"
                aria-selected={tab === t.id}
                className={tab === t.id ? 'lw-tab lw-tab-on' : 'lw-tab'}
                onClick={() => setView(t.id)}
              >
                {t.label}
                {t.id === 'compare' && pinned ? ' •' : ''}
              </button>
            ))}
            <span className="lw-spacer" />
            <button type="button" className="lw-mini" onClick={() => void pinCurrent()} title="Pin the current results to compare against">
              Pin
            </button>
            <button
              type="button"
              className="lw-mini"
              data-export="report:html"
              onClick={() => void exportReport()}
              title="Design report (HTML, self-contained)"
            >
              Report
            </button>
          </div>
          <div className="lw-view-body" role="tabpanel" aria-label={tab}>
            {tab === 'response' && <ResponseView pal={pal} />}
            {tab === 'frequency' && <FrequencyView pal={pal} />}
            {tab === 'loops' && <LoopsView pal={pal} />}
            {tab === 'closed-loop' && <ClosedLoopView pal={pal} />}
            {tab === 'compare' && <CompareView pal={pal} />}
            {tab === 'fit' && <FitView pal={pal} />}
            {tab === 'tune' && <TuneView pal={pal} />}
          </div>
        </div>
      </div>
      <DrawnGenerations />
    </div>
  );
}
