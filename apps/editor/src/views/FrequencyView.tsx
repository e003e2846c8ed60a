/**
 * The Frequency view: Bode magnitude and phase of L at the chosen cut with crossovers and
 * margins marked, Nyquist of L, and |S| with |T|.
 */
import { useMemo, useState } from 'react';
import { useResultsStore } from '../analysis/results-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import { useDiagramStore } from '../store/diagram-store.ts';
import { bodeOption, marginsText, nyquistOption, sensitivityOption, sensitivityText } from './frequency-option.ts';
import { ChartFrame } from './ChartFrame.tsx';
import type { Palette } from './palette.ts';
import { useStale } from './BusyBar.tsx';
import { SampledLoopPanel } from './SampledLoopPanel.tsx';

export function FrequencyView({ pal }: { pal: Palette }) {
  const analysis = useResultsStore((s) => s.analysis);
  const stale = useStale('analysis');
  const pinned = useAnalysisStore((s) => s.pinned);
  const setOptions = useAnalysisStore((s) => s.setOptions);
  const [nySize, setNySize] = useState({ width: 360, height: 300 });
  const f = analysis?.frequency?.ok ? analysis.frequency.value : null;
  const cuts = useDiagramStore((s) => s.diagram.cuts);
  // The diagram's cuts, and the proposed one the engine opened when the diagram has none.
  const rows = useMemo(() => {
    const list = cuts.map((c) => ({ cutId: c.id, label: c.label ?? c.wire, auto: false }));
    if (f && !list.some((r) => r.cutId === f.cutId)) list.push({ cutId: f.cutId, label: f.label, auto: true });
    return list;
  }, [cuts, f]);
  const pin = pinned?.frequency && f && pinned.frequency.cutId === f.cutId ? pinned.frequency : null;

  const bode = useMemo(() => (f ? bodeOption(f, pin, pal) : null), [f, pin, pal]);
  const nyq = useMemo(() => (f ? nyquistOption(f, pin, pal, nySize) : null), [f, pin, pal, nySize]);
  const sens = useMemo(() => (f ? sensitivityOption(f, pin, pal) : null), [f, pin, pal]);

  const picker = (
    <label className="lw-field">
      <span>Cut</span>
      <select aria-label="Cut shown" value={f?.cutId ?? ''} onChange={(e) => setOptions({ cutId: e.target.value || null })}>
        {rows.map((r) => (
          <option key={r.cutId} value={r.cutId}>
            {r.label}
            {r.auto ? ' (proposed)' : ''}
          </option>
        ))}
      </select>
    </label>
  );
  if (!f) {
    const why =
      analysis?.frequency && !analysis.frequency.ok
        ? analysis.frequency.error
        : analysis
          ? 'No loop to open: mark a cut on a feedback wire (right-click a wire on the canvas).'
          : 'Computing…';
    return (
      <div className="lw-view">
        {rows.length > 0 && <div className="lw-view-tools">{picker}</div>}
        <div className="lw-empty">{why}</div>
      </div>
    );
  }
  return (
    <div className={`lw-view lw-frequency${stale ? ' lw-stale' : ''}`} data-stale={stale}>
      <div className="lw-view-tools">
        {picker}
        <span className={f.margins.closedLoopStable ? 'lw-ok' : 'lw-bad'}>
          {f.margins.closedLoopStable ? 'closed loop stable' : 'closed loop UNSTABLE'}
        </span>
        {pin && <span className="lw-muted">dotted: pinned</span>}
      </div>
      <div className="lw-grid-freq">
        <ChartFrame
          name="bode"
          title={`Bode of L`}
          background={pal.background}
          option={bode!}
          extra={
            <span className="lw-muted" title={marginsText(f.margins)}>
              {marginsText(f.margins)}
            </span>
          }
        />
        <ChartFrame name="nyquist" title="Nyquist of L" background={pal.background} option={nyq!} onSize={setNySize} />
      </div>
      {analysis?.sampled?.ok && <SampledLoopPanel data={analysis.sampled.value} pal={pal} />}
      {analysis?.sampled && !analysis.sampled.ok && <div className="lw-bad small">Sampled loop: {analysis.sampled.error}</div>}
      <div className="lw-grid-1">
        <ChartFrame
          name="sensitivity"
          title="|S| and |T|"
          background={pal.background}
          option={sens!}
          extra={<span className="lw-muted">{sensitivityText(f.margins)}</span>}
        />
      </div>
    </div>
  );
}
