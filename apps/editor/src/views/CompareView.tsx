/**
 * Compare: pin the current results, change parameters, and see both overlaid (here and, dotted,
 * in every other view), with a table of the differences. The pinned design is re-run under the
 * current simulation settings (end time, tolerances), so a response figure never compares runs
 * of different lengths; when that re-run fails, the response is left out and the reason shown.
 */
import { useMemo } from 'react';
import { useResultsStore } from '../analysis/results-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import { useDiagramStore } from '../store/diagram-store.ts';
import { currentInputs, withAllResults } from '../analysis/driver.ts';
import { takeSnapshot, tunedValues, type AnalysisSnapshot } from '../analysis/snapshot.ts';
import { comparableRun, differences, runsDiffer, type DiffRow } from '../analysis/compare.ts';
import type { PinnedRun } from '../analysis/results-store.ts';
import type { ResponseResult } from '@loopwright/study';
import { formatEngineering } from '@loopwright/lti';
import { fmt } from '../analysis/sweep.ts';
import { responseOption } from './response-option.ts';
import { bodeOption } from './frequency-option.ts';
import { ChartFrame } from './ChartFrame.tsx';
import type { Palette } from './palette.ts';

/** A snapshot of what the views show now. */
export function currentSnapshot(label: string): AnalysisSnapshot {
  const inp = currentInputs();
  const rs = useResultsStore.getState();
  return takeSnapshot(
    label,
    { diagram: inp.diagram, live: inp.live },
    tunedValues(inp.diagram, inp.live),
    rs.analysis,
    rs.loops,
    rs.response,
  );
}

export function pinCurrent(): Promise<void> {
  return withAllResults(() => {
    const n = new Date();
    useAnalysisStore.getState().pin(currentSnapshot(`pinned ${n.toLocaleTimeString()}`));
  });
}

export function CompareView({ pal }: { pal: Palette }) {
  const pinned = useAnalysisStore((s) => s.pinned);
  const analysis = useResultsStore((s) => s.analysis);
  const response = useResultsStore((s) => s.response);
  const loops = useResultsStore((s) => s.loops);
  const pinnedRun = useResultsStore((s) => s.pinnedRun);
  const diagram = useDiagramStore((s) => s.diagram);
  const live = useAnalysisStore((s) => s.liveValue);
  const now = useMemo(() => currentSnapshot('now'), [analysis, loops, response, diagram, live]); // eslint-disable-line react-hooks/exhaustive-deps
  // What changed first, then the rest for reference.
  const rows = useMemo(() => {
    if (!pinned) return [];
    const all = differences(pinned, now, comparableRun(pinnedRun, response));
    const changed = (r: (typeof all)[number]) =>
      r.pinned !== r.current &&
      !(r.pinned !== null && r.current !== null && Math.abs(r.current - r.pinned) <= 1e-12 * Math.max(1, Math.abs(r.pinned)));
    return [...all.filter(changed), ...all.filter((r) => !changed(r))];
  }, [pinned, now, pinnedRun, response]);
  const resp = useMemo(() => {
    if (!response) return null;
    const probes = response.probes.map((p) => p.id);
    return responseOption(response, probes, comparableRun(pinnedRun, response), pal);
  }, [response, pinnedRun, pal]);
  const runNote = pinned ? pinnedRunNote(pinnedRun, response) : null;
  const f = analysis?.frequency?.ok ? analysis.frequency.value : null;
  const bode = useMemo(
    () => (f ? bodeOption(f, pinned?.frequency && pinned.frequency.cutId === f.cutId ? pinned.frequency : null, pal) : null),
    [f, pinned, pal],
  );

  return (
    <div className="lw-view lw-compare">
      <div className="lw-view-tools">
        <button type="button" onClick={() => void pinCurrent()} data-testid="pin">
          {pinned ? 'Pin again' : 'Pin current results'}
        </button>
        <button type="button" disabled={!pinned} onClick={() => useAnalysisStore.getState().pin(null)}>
          Unpin
        </button>
        <span className="lw-muted">
          {pinned
            ? `${pinned.label} — change parameters to compare; pinned traces are dotted in every view`
            : 'Pin the current results, then change parameters to compare.'}
        </span>
      </div>
      {pinned && (
        <>
          {runNote && (
            <div className={runNote.ok ? 'lw-note' : 'lw-error'} data-testid="pinned-run-note">
              {runNote.text}
            </div>
          )}
          <table className="lw-table lw-compact" data-testid="compare-table">
            <thead>
              <tr>
                <th>item</th>
                <th>quantity</th>
                <th>pinned</th>
                <th>now</th>
                <th>change</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((r, i) => {
                const d = r.pinned !== null && r.current !== null ? r.current - r.pinned : null;
                const changed = d !== null && Math.abs(d) > 1e-12 * Math.max(1, Math.abs(r.pinned ?? 0));
                return (
                  <tr key={i} className={changed ? 'lw-changed' : ''}>
                    <td>{r.item}</td>
                    <td>{r.quantity}</td>
                    <td>{show(r, r.pinned)}</td>
                    <td>{show(r, r.current)}</td>
                    <td>
                      {d === null ? (r.pinned === r.current ? '' : 'n/a') : changed ? `${d > 0 ? '+' : '−'}${fmt(Math.abs(d))}` : '='}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          <div className="lw-grid-2">
            {resp && <ChartFrame name="compare-response" title="Response: now vs pinned" background={pal.background} option={resp} />}
            {bode && <ChartFrame name="compare-bode" title="Bode: now vs pinned" background={pal.background} option={bode} />}
          </div>
        </>
      )}
    </div>
  );
}

/** What Compare says about the response comparison. */
/** Tuned values as the Parameters panel writes them (50e-6), the rest as the readouts do. */
function show(r: DiffRow, v: number | null): string {
  return r.group === 'value' && v !== null ? formatEngineering(v) : fmt(v);
}

function pinnedRunNote(p: PinnedRun | null, current: ResponseResult | null): { ok: boolean; text: string } | null {
  if (!current) return null;
  if (!p) return { ok: true, text: 'Re-running the pinned design under the current simulation settings…' };
  if (!p.ok)
    return { ok: false, text: `Response not compared: the pinned design cannot be re-run under the current settings (${p.error}).` };
  const why = runsDiffer(p.value, current);
  if (why) return { ok: false, text: `Response not compared: ${why}.` };
  return {
    ok: true,
    text: `Response: the pinned design re-run under the current settings (${fmt(current.settings.until)} s, rtol ${fmt(current.settings.rtol, 2)}), so both runs have one length.`,
  };
}
