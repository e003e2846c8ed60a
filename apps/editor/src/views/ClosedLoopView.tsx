/**
 * The Closed loop view: pick where a signal enters (a source, any block's output, any wire)
 * and where it is measured (a probe, a block's output, a wire); see the closed-loop transfer
 * function between them with every loop closed — exact as a rational function, a dead time
 * factored out where it can be — its poles and zeros (those found through a Padé approximant
 * said so), its static gain, and its step response and Bode diagram.
 */
import { useMemo } from 'react';
import { describeRef, type Diagram, type SignalRef } from '@loopwright/graph';
import { poly } from '@loopwright/lti';
import { useResultsStore } from '../analysis/results-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import { closedLoopPoints } from '../analysis/driver.ts';
import { useDiagramStore } from '../store/diagram-store.ts';
import { fmt } from '../analysis/sweep.ts';
import { closedLoopBodeOption, closedLoopStepOption } from './closed-loop-option.ts';
import { ChartFrame } from './ChartFrame.tsx';
import { RootsTable } from './RootsTable.tsx';
import type { Palette } from './palette.ts';
import { useStale } from './BusyBar.tsx';

const refText = (r: SignalRef): string => ('block' in r ? `block:${r.block}` : `wire:${r.wire}`);

/** The points a signal can enter at (sources first) or be measured at (probes first), with their names. */
function pointOptions(d: Diagram, first: 'source' | 'probe'): { value: string; label: string }[] {
  const name = (id: string) => d.blocks.find((b) => b.id === id)?.label ?? id;
  const blocks = d.blocks
    .filter((b) => (first === 'source' ? b.kind !== 'probe' : b.kind !== 'source'))
    .sort((a, b) => Number(b.kind === first) - Number(a.kind === first))
    .map((b) => ({ value: `block:${b.id}`, label: b.kind === first ? `${first} ${b.label ?? b.id}` : `output of ${b.label ?? b.id}` }));
  const wires = d.wires.map((w) => ({ value: `wire:${w.id}`, label: `wire ${w.id} (${name(w.from.block)} → ${name(w.to.block)})` }));
  return [...blocks, ...wires];
}

/** A rational function with dead time, highest power first. */
function transferText(num: number[], den: number[], delay: number): string {
  const n = poly.format(num);
  const body = den.length === 1 && den[0] === 1 ? n : `(${n}) / (${poly.format(den)})`;
  return delay > 0 ? `${body} · e^(−${fmt(delay)}·s)` : body;
}

/** A labelled choice of a point of the diagram. */
function PointSelect(props: {
  label: string;
  aria: string;
  value: string;
  options: { value: string; label: string }[];
  onChange(v: string): void;
}) {
  return (
    <label className="lw-field">
      <span>{props.label}</span>
      <select aria-label={props.aria} value={props.value} onChange={(e) => props.onChange(e.target.value)}>
        {props.options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </label>
  );
}

export function ClosedLoopView({ pal }: { pal: Palette }) {
  const result = useResultsStore((s) => s.closedLoop);
  const error = useResultsStore((s) => s.errors['closed-loop']);
  const stale = useStale('closed-loop');
  const diagram = useDiagramStore((s) => s.diagram);
  const from = useAnalysisStore((s) => s.closedLoopFrom);
  const to = useAnalysisStore((s) => s.closedLoopTo);
  const setOptions = useAnalysisStore((s) => s.setOptions);
  const points = closedLoopPoints(diagram, from, to);
  const fromOptions = useMemo(() => pointOptions(diagram, 'source'), [diagram]);
  const toOptions = useMemo(() => pointOptions(diagram, 'probe'), [diagram]);
  const c = result?.ok ? result.value : null;
  // A result for other points than those picked (the reply is on its way) is not shown as theirs.
  const current = c && points && refText(c.from) === refText(points.from) && refText(c.to) === refText(points.to) ? c : null;
  const step = useMemo(() => (current ? closedLoopStepOption(current, pal) : null), [current, pal]);
  const bode = useMemo(() => (current ? closedLoopBodeOption(current, pal) : null), [current, pal]);

  const picker = (
    <>
      <PointSelect
        label="from"
        aria="Closed loop from"
        value={points ? refText(points.from) : ''}
        options={fromOptions}
        onChange={(v) => setOptions({ closedLoopFrom: v })}
      />
      <PointSelect
        label="to"
        aria="Closed loop to"
        value={points ? refText(points.to) : ''}
        options={toOptions}
        onChange={(v) => setOptions({ closedLoopTo: v })}
      />
    </>
  );
  if (!points) return <div className="lw-empty">Add a source and a probe (or pick any two wires) to see the closed loop between them.</div>;
  const why = result && !result.ok ? result.error : error;
  return (
    <div className={`lw-view lw-closed-loop${stale ? ' lw-stale' : ''}`} data-stale={stale}>
      <div className="lw-view-tools">
        {picker}
        {current && (
          <span className="lw-tag" title={current.delayHandling.note}>
            {current.delayHandling.mode === 'pade'
              ? `dead time as Padé (${current.delayHandling.order ?? ''},${current.delayHandling.order ?? ''})`
              : current.delayHandling.mode === 'exact'
                ? 'dead time exact'
                : 'no dead time'}
          </span>
        )}
      </div>
      {!current && <div className={why ? 'lw-error' : 'lw-empty'}>{why ? `Closed loop: ${why}` : 'Computing…'}</div>}
      {current && (
        <>
          <div data-testid="closed-loop-tf" className="lw-transfer">
            T(s) from {describeRef(current.from)} to {describeRef(current.to)} ={' '}
            {transferText(current.transfer.num, current.transfer.den, current.transfer.delay)}
          </div>
          <div className="lw-note">
            static gain T(0) ={' '}
            <b data-testid="closed-loop-static-gain" data-value={String(current.staticGain)}>
              {fmt(current.staticGain)}
            </b>{' '}
            · leading gain {fmt(current.gain)} · {current.delayHandling.note}
            {current.hiddenModes.length > 0 && (
              <>
                {' '}
                · cancelled (hidden) modes:{' '}
                {current.hiddenModes.map((p) => (p.im ? `${fmt(p.re)} ± j${fmt(Math.abs(p.im))}` : fmt(p.re))).join(', ')}
              </>
            )}
          </div>
          <div className="lw-grid-2 lw-short">
            {step && <ChartFrame name="closed-loop-step" title="Step response" background={pal.background} option={step} />}
            {bode && <ChartFrame name="closed-loop-bode" title="Bode of T" background={pal.background} option={bode} />}
          </div>
          <div style={{ display: 'flex', flexWrap: 'wrap' }}>
            <RootsTable title="poles" roots={current.poles} origin={current.poleOrigin} testId="closed-loop-poles" />
            <RootsTable title="zeros" roots={current.zeros} origin={current.zeroOrigin} testId="closed-loop-zeros" />
          </div>
        </>
      )}
    </div>
  );
}
