/**
 * Parameters: the diagram's named values with unit and slider range. Values read in
 * engineering notation with their unit always in view; a slider writes values rounded to 4
 * significant digits; a slider drag, or a run of arrow-key nudges, is one undo step.
 * Renaming rewrites every use in block fields token by token; "Sweep" makes the parameter the
 * one the Locus view varies.
 */
import { useEffect, useRef, useState } from 'react';
import { formatEngineering, roundSignificant } from '@loopwright/lti';
import { beginGesture, coalesced, endCoalescing, endGesture, useDiagramStore } from '../store/diagram-store.ts';
import type { Diagram, NamedParameter } from '../store/graph-bridge.ts';
import { EngineeringInput } from './EngineeringInput.tsx';
// The analysis sweep bar's choice (E2) is what is really swept; "Sweep" here sets both.
import { useSweepChoice } from '../views/SweepBar.tsx';
import { useAnalysisStore } from '../analysis/analysis-store.ts';

/** Same rule as the document schema: an identifier, not s / exp / an expression keyword. */
const NAME_RE =
  /^(?!(?:s|exp|__proto__|constructor|prototype|mod|to|in|and|or|not|xor|true|false|null|undefined|NaN|Infinity|e|pi|i)$)[A-Za-z_][A-Za-z0-9_]{0,63}$/;

export function nameProblem(d: Diagram, oldName: string, name: string): string | null {
  if (name === oldName) return null;
  if (!NAME_RE.test(name)) return 'a name is letters, digits and "_" (not starting with a digit), and not s, exp, e, pi or a keyword';
  if (d.parameters.some((p) => p.name === name)) return `"${name}" is already a parameter`;
  return null;
}

function sliderPos(p: NamedParameter, lo: number, hi: number): number {
  const v = Math.min(Math.max(p.value, lo), hi);
  if (p.scale === 'log' && lo > 0) return (Math.log(v / lo) / Math.log(hi / lo)) * 1000;
  return ((v - lo) / (hi - lo || 1)) * 1000;
}
/** Significant digits of a value set with a slider (a slider step is finer than a tenth of a per cent only near 1000). */
export const SLIDER_DIGITS = 4;
function sliderValue(p: NamedParameter, lo: number, hi: number, pos: number): number {
  const f = pos / 1000;
  const v = p.scale === 'log' && lo > 0 ? lo * Math.pow(hi / lo, f) : lo + f * (hi - lo);
  return roundSignificant(v, SLIDER_DIGITS);
}

/** A width that shows the whole text (at least `min` characters): names and units are never cut off. */
const fitText = (text: string, min: number) => `calc(${Math.max(min, [...text].length + 1)}ch + 10px)`;

function ParameterRow({ diagram, p, sweptName }: { diagram: Diagram; p: NamedParameter; sweptName: string | undefined }) {
  const st = useDiagramStore.getState();
  const [name, setName] = useState(p.name);
  useEffect(() => setName(p.name), [p.name]);
  const problem = nameProblem(diagram, p.name, name);
  const lo = p.min ?? Math.min(0, p.value);
  const hi = p.max ?? Math.max(1, 2 * Math.abs(p.value));
  const sweep = diagram.sweeps.find((s) => s.parameter === p.name);
  const active = sweptName === p.name;
  const commitName = () => {
    if (name === p.name) return;
    if (problem) return;
    st.renameParameter(p.name, name);
  };
  const sweepButton = (
    <button
      type="button"
      className={active ? 'toggle on' : 'toggle'}
      aria-pressed={Boolean(active)}
      aria-label={`Sweep ${p.name}`}
      title="Sweep this parameter in the Locus view"
      onClick={() => {
        if (sweep) st.setView({ activeSweep: sweep.id });
        else {
          const id = st.addSweep({ parameter: p.name, min: lo, max: hi, scale: p.scale ?? 'linear' });
          st.setView({ activeSweep: id });
        }
        useAnalysisStore.getState().setSweepKey(`param:${p.name}`);
      }}
    >
      Sweep
    </button>
  );
  const unit = p.unit ?? '';
  // True while an arrow key is held down (auto-repeat): its nudges are one run whatever their pace.
  const held = useRef(false);
  return (
    <li className={`param-row${active ? ' is-swept' : ''}`} aria-label={`parameter ${p.name}`}>
      <div className="param-line param-head">
        <input
          className={`pname mono${problem ? ' invalid' : ''}`}
          style={{ width: fitText(name, 6) }}
          aria-label={`Name of parameter ${p.name}`}
          aria-invalid={problem ? true : undefined}
          value={name}
          spellCheck={false}
          title={p.name}
          onChange={(e) => setName(e.target.value)}
          onBlur={commitName}
          onKeyDown={(e) => {
            if (e.key === 'Enter') commitName();
            if (e.key === 'Escape') setName(p.name);
          }}
        />
        <span>=</span>
        <EngineeringInput
          label={`Value of ${p.name}`}
          unit={unit || undefined}
          value={p.value}
          onCommit={(v) => v !== undefined && st.setParameterValue(p.name, v)}
        />
        {/* Sized to its text, so a unit is never cut off. */}
        <input
          className="unit-in"
          aria-label={`Unit of ${p.name}`}
          placeholder="unit"
          key={`u:${unit}`}
          defaultValue={unit}
          title={unit ? `unit: ${unit}` : 'unit'}
          style={{ width: fitText(unit, 4) }}
          onInput={(e) => ((e.target as HTMLInputElement).style.width = fitText((e.target as HTMLInputElement).value, 4))}
          onBlur={(e) => e.target.value !== unit && st.updateParameter(p.name, { unit: e.target.value || undefined })}
          onKeyDown={(e) => e.key === 'Enter' && (e.target as HTMLInputElement).blur()}
        />
        <button
          type="button"
          className="icon"
          aria-label={`Remove parameter ${p.name}`}
          title="Remove"
          onClick={() => st.removeParameter(p.name)}
        >
          ×
        </button>
      </div>
      {problem && (
        <div className="field-error small" role="alert">
          {problem}
        </div>
      )}
      <div className="param-line">
        <EngineeringInput
          className="range"
          optional
          label={`Slider minimum of ${p.name}`}
          unit={unit || undefined}
          value={p.min}
          onCommit={(v) => st.updateParameter(p.name, { min: v })}
        />
        <input
          type="range"
          min={0}
          max={1000}
          step={1}
          aria-label={`Slider for ${p.name}`}
          aria-valuetext={`${p.name} = ${formatEngineering(p.value, { style: 'si', unit: unit || undefined })}`}
          title={`${p.name} = ${formatEngineering(p.value, { style: 'si', unit: unit || undefined })}`}
          value={sliderPos(p, lo, hi)}
          onPointerDown={() => {
            held.current = false;
            beginGesture();
          }}
          onPointerUp={endGesture}
          onKeyDown={(e) => (held.current = e.repeat)}
          onKeyUp={() => (held.current = false)}
          onBlur={() => {
            endGesture();
            endCoalescing();
          }}
          // Keyboard nudges arrive here one by one: a run of them is one undo step.
          onChange={(e) => {
            const v = sliderValue(p, lo, hi, Number(e.target.value));
            coalesced(`parameter-value:${p.name}`, () => st.setParameterValue(p.name, v), { held: held.current });
          }}
        />
        <EngineeringInput
          className="range"
          optional
          label={`Slider maximum of ${p.name}`}
          unit={unit || undefined}
          value={p.max}
          onCommit={(v) => st.updateParameter(p.name, { max: v })}
        />
        {sweepButton}
      </div>
    </li>
  );
}

export function ParametersPanel() {
  const diagram = useDiagramStore((s) => s.diagram);
  const { choice } = useSweepChoice();
  const sweptName = choice?.target.kind === 'parameter' ? choice.target.name : undefined;
  return (
    <section className="panel params" aria-label="Parameters">
      <h2>
        Parameters
        <button type="button" className="small-btn" aria-label="Add parameter" onClick={() => useDiagramStore.getState().addParameter()}>
          + Add
        </button>
      </h2>
      {diagram.parameters.length === 0 ? (
        <p className="muted small pad">No named parameters. Add one and use its name in block fields (e.g. Kp).</p>
      ) : (
        <ul className="param-list">
          {diagram.parameters.map((p) => (
            <ParameterRow key={p.name} diagram={diagram} p={p} sweptName={sweptName} />
          ))}
        </ul>
      )}
    </section>
  );
}
