/**
 * Where a block's model came from, in the Details panel: the test log (name, SHA-256), the model
 * and its intervals, the fit quality and the date — and whether the block was edited since.
 */
import './commission.css';
import type { Block, Diagram } from '../store/graph-bridge.ts';
import { fmt } from '../analysis/sweep.ts';

const interval = (i: [number, number] | null) => (i ? `${fmt(i[0], 3)}…${fmt(i[1], 3)}` : 'not determined');

export function FitRecordNote({ diagram, block }: { diagram: Diagram; block: Block }) {
  const rec = [...(diagram.fits ?? [])].reverse().find((f) => f.block === block.id);
  if (!rec) return null;
  const edited = block.kind !== 'transfer-function' || block.params.expression !== rec.expression;
  const m = rec.model;
  return (
    <div className="fit-record small" data-testid="fit-record" aria-label="Fitted model">
      <div>
        <strong>Fitted {m.kind.toUpperCase()}</strong> from <span className="mono">{rec.source.fileName ?? 'a test log'}</span>
        {rec.source.sha256 && (
          <span className="muted mono" title={`SHA-256 ${rec.source.sha256}`}>
            {' '}
            sha256 {rec.source.sha256.slice(0, 12)}…
          </span>
        )}
      </div>
      <div className="muted">
        K {fmt(m.gain)} ({interval(rec.intervals.gain)})
        {m.timeConstants.map((t, i) => ` · τ${i + 1} ${fmt(t)} s (${interval(rec.intervals.timeConstants[i] ?? null)})`).join('')} · θ{' '}
        {fmt(m.deadTime)} s ({interval(rec.intervals.deadTime)}) · NRMSE {fmt(100 * rec.quality.nrmse, 3)} % · {rec.source.samples} samples,
        columns {rec.source.columns.time}/{rec.source.columns.input}/{rec.source.columns.output} ·{' '}
        {rec.fittedAt.slice(0, 16).replace('T', ' ')} UTC
      </div>
      {edited && <div className="warn">The block was edited since this fit.</div>}
      <div className="muted">A fitted model is only as good as its test.</div>
    </div>
  );
}
