/**
 * The sweep bar: pick the swept quantity, set its range and scale, move the slider. The
 * slider's value is live (analysis store) and follows into every view at once; releasing the
 * slider, pressing Apply or Enter commits it to the document (one undo step).
 */
import { useEffect, useLayoutEffect, useMemo, useRef } from 'react';
import { roundSignificant } from '@loopwright/lti';
import { coalesced, useDiagramStore } from '../store/diagram-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import {
  documentValue,
  editedRange,
  fmt,
  positionToValue,
  resolveSweep,
  valueInForce,
  valueToPosition,
  widenedRange,
  type SweepChoice,
  type SweepRange,
} from '../analysis/sweep.ts';

const STEPS = 1000;

/**
 * The sweep in force (the study's answer, the same one the requests use): the swept quantity,
 * the choices and the range. Not the live value, which does not change them: the canvas, the
 * parameter list and the Locus view then do not render again on every slider step.
 */
export function useSweepChoice(): { choices: SweepChoice[]; choice: SweepChoice | null; range: SweepRange | null } {
  const diagram = useDiagramStore((s) => s.diagram);
  const key = useAnalysisStore((s) => s.sweepKey);
  const ranges = useAnalysisStore((s) => s.ranges);
  return useMemo(() => {
    const { choices, choice, range } = resolveSweep(diagram, { key, liveValue: null, ranges });
    return { choices, choice, range };
  }, [diagram, key, ranges]);
}

/** Writes a sweep value into the document (a parameter's value or a gain block's k). */
export function commitSweepValue(choice: SweepChoice, value: number): void {
  if (!Number.isFinite(value)) return;
  const st = useDiagramStore.getState();
  const current = documentValue(st.diagram, choice.target);
  if (current !== value) {
    if (choice.target.kind === 'parameter') st.setParameterValue(choice.target.name, value);
    else st.updateBlockParams(choice.target.block, { [choice.target.field]: value });
  }
  useAnalysisStore.getState().setLiveValue(null);
}

/** Widens the slider range (on a nice boundary) so that it holds v. */
export function widenRangeFor(choice: SweepChoice, range: SweepRange, v: number): void {
  const r = widenedRange(range, v);
  if (r) useAnalysisStore.getState().setRange(choice.key, r);
}

function persistRange(choice: SweepChoice, r: SweepRange): void {
  useAnalysisStore.getState().setRange(choice.key, r);
  if (choice.target.kind !== 'parameter') return;
  const st = useDiagramStore.getState();
  const name = choice.target.name;
  const existing = st.diagram.sweeps.find((s) => s.parameter === name);
  if (existing) st.updateSweep(existing.id, { min: r.min, max: r.max, scale: r.scale });
  else st.addSweep({ parameter: name, min: r.min, max: r.max, scale: r.scale });
}

export function SweepBar() {
  const { choices, choice, range } = useSweepChoice();
  const live = useAnalysisStore((s) => s.liveValue);
  const value = choice ? valueInForce(choice, live) : Number.NaN;
  const ui = useAnalysisStore.getState;
  const slider = useRef<HTMLInputElement>(null);
  const choiceRef = useRef(choice);
  useLayoutEffect(() => {
    choiceRef.current = choice;
  });
  // The native change event fires when a drag ends, wherever the pointer is released.
  useEffect(() => {
    const el = slider.current;
    if (!el) return;
    const onChange = () => {
      const v = useAnalysisStore.getState().liveValue;
      const c = choiceRef.current;
      // A slider value is written with 4 significant digits; a run of arrow-key nudges is one undo step.
      if (v !== null && c) coalesced(`sweep:${c.key}`, () => commitSweepValue(c, roundSignificant(v, 4)));
    };
    el.addEventListener('change', onChange);
    return () => el.removeEventListener('change', onChange);
  }, [choice?.key]);

  if (!choice || !range) {
    return (
      <div className="lw-sweepbar" role="group" aria-label="Sweep">
        <span className="lw-muted">No sweep: add a named parameter (Parameters) or a gain block to sweep it.</span>
      </div>
    );
  }
  const pos = Math.round(valueToPosition(range, value) * STEPS);
  const commit = () => {
    const v = useAnalysisStore.getState().liveValue;
    if (v !== null) coalesced(`sweep:${choice.key}`, () => commitSweepValue(choice, roundSignificant(v, 4)));
  };
  const setRange = (patch: Partial<SweepRange>) => {
    const r = editedRange(range, patch);
    if (r) persistRange(choice, r);
  };

  return (
    <div className="lw-sweepbar" role="group" aria-label="Sweep">
      <label className="lw-field">
        <span>Sweep</span>
        <select
          aria-label="Swept quantity"
          value={choice.key}
          onChange={(e) => {
            const c = choices.find((x) => x.key === e.target.value);
            ui().setSweepKey(e.target.value);
            if (c?.target.kind === 'parameter') {
              const sw = useDiagramStore.getState().diagram.sweeps.find((s) => s.parameter === (c.target as { name: string }).name);
              if (sw) useDiagramStore.getState().setView({ activeSweep: sw.id });
            }
          }}
        >
          {choices.map((c) => (
            <option key={c.key} value={c.key}>
              {c.label}
            </option>
          ))}
        </select>
      </label>
      <NumberBox label="from" value={range.min} onCommit={(v) => setRange({ min: v })} />
      <input
        ref={slider}
        type="range"
        className="lw-slider"
        aria-label={`Sweep value of ${choice.label}`}
        data-testid="sweep-slider"
        min={0}
        max={STEPS}
        step={1}
        value={pos}
        onChange={(e) => ui().setLiveValue(positionToValue(range, Number(e.target.value) / STEPS))}
        onPointerUp={commit}
        onKeyUp={(e) => {
          if (e.key.startsWith('Arrow') || e.key === 'Home' || e.key === 'End' || e.key.startsWith('Page')) commit();
        }}
      />
      <NumberBox label="to" value={range.max} onCommit={(v) => setRange({ max: v })} />
      <select aria-label="Slider scale" value={range.scale} onChange={(e) => setRange({ scale: e.target.value as 'linear' | 'log' })}>
        <option value="linear">linear</option>
        <option value="log">log</option>
      </select>
      <NumberBox
        label="value"
        wide
        testId="sweep-value"
        value={value}
        onCommit={(v) => {
          widenRangeFor(choice, range, v);
          commitSweepValue(choice, v);
        }}
      />
      <button type="button" disabled={live === null} onClick={commit} title="Write the slider value into the diagram (Enter)">
        Apply
      </button>
      <button type="button" disabled={live === null} onClick={() => ui().setLiveValue(null)} title="Back to the diagram's value">
        Reset
      </button>
      {live !== null && (
        <span className="lw-live" title="Not yet applied to the diagram">
          live
        </span>
      )}
    </div>
  );
}

/** A number input that commits on Enter or blur and shows the value with 4 digits otherwise. */
function NumberBox(props: { label: string; value: number; onCommit(v: number): void; wide?: boolean; testId?: string }) {
  const box = useRef<HTMLInputElement>(null);
  // The box follows the value (each slider step) unless it is being typed in; set in place,
  // not by remounting the input, which made every step restyle and lay out the bar anew.
  useEffect(() => {
    const el = box.current;
    if (el && document.activeElement !== el) el.value = fmt(props.value);
  }, [props.value]);
  return (
    <label className="lw-field">
      <span>{props.label}</span>
      <input
        ref={box}
        className={props.wide ? 'lw-num lw-num-wide' : 'lw-num'}
        data-testid={props.testId}
        defaultValue={fmt(props.value)}
        aria-label={props.label}
        onKeyDown={(e) => {
          if (e.key === 'Enter') (e.target as HTMLInputElement).blur();
          if (e.key === 'Escape') {
            (e.target as HTMLInputElement).value = fmt(props.value);
            (e.target as HTMLInputElement).blur();
          }
        }}
        onBlur={(e) => {
          const text = e.target.value.trim();
          const v = Number(text.replace('−', '-'));
          if (text !== '' && text !== fmt(props.value) && Number.isFinite(v)) props.onCommit(v);
          else e.target.value = fmt(props.value);
        }}
      />
    </label>
  );
}
