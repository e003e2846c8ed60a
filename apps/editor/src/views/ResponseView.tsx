/**
 * The Response view: simulated responses of the chosen probes to the diagram's sources, with
 * nonlinearities, over the linear model's response, in small multiples (probes of one unit on
 * a shared axis); the actuator signals with their limits; the metrics table. CSV export of
 * every trace. The pinned design's re-run (Compare) is drawn dotted.
 */
import { useMemo } from 'react';
import { responsePanels, shownProbes, type ResponseResult } from '@loopwright/study';
import { comparableRun } from '../analysis/compare.ts';
import { useResultsStore } from '../analysis/results-store.ts';
import { useDiagramStore } from '../store/diagram-store.ts';
import { fmt } from '../analysis/sweep.ts';
import { download, responseCsv, slug } from '../analysis/export.ts';
import { actuatorOption, probeColor, responseHeight, responseOption } from './response-option.ts';
import { ChartFrame } from './ChartFrame.tsx';
import type { Palette } from './palette.ts';
import { useStale } from './BusyBar.tsx';

export function exportResponseCsv(r: ResponseResult): void {
  download(`${slug(useDiagramStore.getState().diagram.title)}-traces.csv`, responseCsv(r), 'text/csv');
}

export function ResponseView({ pal }: { pal: Palette }) {
  const r = useResultsStore((s) => s.response);
  const error = useResultsStore((s) => s.errors.response);
  const stale = useStale('response');
  const pinnedRun = useResultsStore((s) => s.pinnedRun);
  const pinned = comparableRun(pinnedRun, r);
  // The run's end time and the probes shown are simulation settings of the document (saved, undoable).
  const diagram = useDiagramStore((s) => s.diagram);
  const simEnd = diagram.simulation?.end;
  const setSimulation = useDiagramStore((s) => s.setSimulation);
  const probes = useMemo(() => (r ? shownProbes(diagram).filter((id) => r.probes.some((p) => p.id === id)) : []), [r, diagram]);
  const option = useMemo(() => (r ? responseOption(r, probes, pinned, pal) : null), [r, probes, pinned, pal]);
  const actOption = useMemo(() => (r && r.actuators.length > 0 ? actuatorOption(r, pinned, pal) : null), [r, pinned, pal]);
  const panels = useMemo(() => (r ? responsePanels(r.probes, probes).length : 1), [r, probes]);

  if (!r) return <div className="lw-empty">{error ? `Response: ${error}` : 'Simulating…'}</div>;
  const toggle = (id: string) => {
    const cur = new Set(probes);
    if (cur.has(id)) cur.delete(id);
    else cur.add(id);
    setSimulation({ probes: r.probes.map((p) => p.id).filter((p) => cur.has(p)) });
  };
  return (
    <div className={`lw-view lw-response${stale ? ' lw-stale' : ''}`} data-stale={stale}>
      <div className="lw-view-tools">
        <span className="lw-muted">Probes</span>
        {r.probes.map((p) => (
          <label key={p.id} className="lw-check">
            <input type="checkbox" checked={probes.includes(p.id)} onChange={() => toggle(p.id)} />
            <span className="lw-swatch" style={{ background: probeColor(r, p.id, pal) }} />
            {p.label}
          </label>
        ))}
        {r.probes.length === 0 && <span className="lw-muted">add a probe block to see a response</span>}
        <label className="lw-field">
          <span>until</span>
          <input
            key={r.until}
            className="lw-num"
            aria-label="Simulation end time"
            defaultValue={simEnd ?? r.until}
            onBlur={(e) => {
              const v = Number(e.target.value);
              const text = e.target.value.trim();
              if (text === '') setSimulation({ end: undefined });
              else if (Number.isFinite(v) && v > 0 && v !== simEnd) setSimulation({ end: v });
              else e.target.value = String(simEnd ?? r.until);
            }}
            onKeyDown={(e) => e.key === 'Enter' && (e.target as HTMLInputElement).blur()}
          />
          <span>s</span>
        </label>
      </div>
      {error && <div className="lw-error">{error}</div>}
      {/* Small multiples: the chart grows with its panels and the view scrolls. */}
      <div className={actOption ? 'lw-grid-2' : 'lw-grid-1'} style={{ minHeight: responseHeight(panels) + 28 }}>
        <ChartFrame
          name="response"
          title="Response"
          background={pal.background}
          option={option!}
          htmlLegend
          liveTraces
          extra={
            <>
              <span className="lw-muted" title="solid: with nonlinearities · dashed: the linear model · dotted: pinned">
                solid: nonlinear · dashed: linear{pinned ? ' · dotted: pinned (re-run under these settings)' : ''}
              </span>
              {r.run.status !== 'ok' && (
                <span className="lw-bad">
                  simulation {r.run.status}: {r.run.message}
                </span>
              )}
              <button
                type="button"
                className="lw-mini"
                data-export="traces:csv"
                title="Every trace as CSV"
                onClick={() => exportResponseCsv(r)}
              >
                CSV
              </button>
            </>
          }
        />
        {actOption && <ChartFrame name="actuator" title="Actuator" background={pal.background} option={actOption} htmlLegend liveTraces />}
      </div>
      <MetricsTable r={r} pinned={pinned} />
    </div>
  );
}

function MetricsTable({ r, pinned }: { r: ResponseResult; pinned: ResponseResult | null }) {
  const rows = r.metrics;
  if (rows.length === 0) return null;
  const pin = (probe: string) => pinned?.metrics.find((m) => m.probe === probe);
  const cell = (v: number | null, p: number | null | undefined, unit = '') => (
    <td>
      {fmt(v)}
      {unit}
      {p !== undefined && p !== v && <span className="lw-pinned-val"> ({fmt(p)})</span>}
    </td>
  );
  return (
    <table className="lw-table" data-testid="metrics-table">
      <thead>
        <tr>
          <th>signal</th>
          <th>rise time 10–90 % [s]</th>
          <th>overshoot [%]</th>
          <th>peak time [s]</th>
          <th>settling ±2 % [s]</th>
          <th>steady state</th>
          <th>steady-state error</th>
          <th>IAE</th>
          <th>time at limit [s]</th>
          <th>peak effort</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((m) => {
          const p = pin(m.probe);
          return (
            <tr key={m.probe}>
              <td>{m.label}</td>
              {cell(m.riseTime, p?.riseTime)}
              {cell(m.overshootPct, p?.overshootPct)}
              {cell(m.peakTime, p?.peakTime)}
              {cell(m.settlingTime, p?.settlingTime)}
              {cell(m.steadyState, p?.steadyState)}
              {cell(m.steadyStateError, p?.steadyStateError)}
              {cell(m.iae, p?.iae)}
              {cell(m.timeInSaturation, p?.timeInSaturation)}
              {cell(m.peakEffort, p?.peakEffort)}
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}
