/**
 * Parameters: the diagram's named values with unit and slider range. Renaming rewrites every
 * use in block fields token by token; dragging a slider is one undo step; "Sweep" makes the
 * parameter the one the Locus view varies.
 */
import { useEffect, useState } from 'react';
import { beginGesture, endGesture, useDiagramStore } from '../store/diagram-store.ts';
import type { Diagram, NamedParameter } from '../store/graph-bridge.ts';
import { compact } from '../canvas/block-formula.ts';
// The analysis sweep bar's choice (E2) is what is really swept; "Sweep" here sets both.
import { useSweepChoice } from '../views/SweepBar.tsx';
import { useAnalysisStore } from '../analysis/analysis-store.ts';

/** Same rule as the document schema: an identifier, not s / exp / an expression keyword. */
const NAME_RE = /^(?!(?:s|exp|__proto__|constructor|prototype|mod|to|in|and|or|not|xor|true|false|null|undefined|NaN|Infinity|e|pi|i)$)[A-Za-z_][A-Za-z0-9_]{0,63}$/;

export function nameProblem(d: Diagram, oldName: string, name: string): string | null {
  if (name === oldName) return null;
  if (!NAME_RE.test(name)) return 'a name is letters, digits and "_" (not starting with a digit), and not s, exp, e, pi or a keyword';
  if (d.parameters.some((p) => p.name === name)) return `"${name}" is already a parameter`;
  return null;
}

function NumberCell({ label, value, onCommit, className }: { label: string; value: number | undefined; onCommit(v: number | undefined): void; className?: string }) {
  const [draft, setDraft] = useState(value === undefined ? '' : String(value));
  useEffect(() => setDraft(value === undefined ? '' : String(value)), [value]);
  const bad = draft.trim() !== '' && !Number.isFinite(Number(draft));
  const commit = () => {
    if (bad) return;
    const v = draft.trim() === '' ? undefined : Number(draft);
    if (v !== value) onCommit(v);
  };
  return (
    <input
      className={`num ${className ?? ''}${bad ? ' invalid' : ''}`}
      aria-label={label}
      aria-invalid={bad || undefined}
      value={draft}
      inputMode="decimal"
      onChange={(e) => setDraft(e.target.value)}
      onBlur={commit}
      onKeyDown={(e) => {
        if (e.key === 'Enter') commit();
        if (e.key === 'Escape') setDraft(value === undefined ? '' : String(value));
      }}
    />
  );
}

function sliderPos(p: NamedParameter, lo: number, hi: number): number {
  const v = Math.min(Math.max(p.value, lo), hi);
  if (p.scale === 'log' && lo > 0) return (Math.log(v / lo) / Math.log(hi / lo)) * 1000;
  return ((v - lo) / (hi - lo || 1)) * 1000;
}
function sliderValue(p: NamedParameter, lo: number, hi: number, pos: number): number {
  const f = pos / 1000;
  const v = p.scale === 'log' && lo > 0 ? lo * Math.pow(hi / lo, f) : lo + f * (hi - lo);
  return Number(v.toPrecision(4));
}

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
  return (
    <li className={`param-row${active ? ' is-swept' : ''}`} aria-label={`parameter ${p.name}`}>
      <div className="param-line">
        <input
          className={`pname mono${problem ? ' invalid' : ''}`}
          aria-label={`Name of parameter ${p.name}`}
          aria-invalid={problem ? true : undefined}
          value={name}
          spellCheck={false}
          onChange={(e) => setName(e.target.value)}
          onBlur={commitName}
          onKeyDown={(e) => {
            if (e.key === 'Enter') commitName();
            if (e.key === 'Escape') setName(p.name);
          }}
        />
        <span>=</span>
        <NumberCell label={`Value of ${p.name}`} value={p.value} onCommit={(v) => v !== undefined && st.setParameterValue(p.name, v)} />
        <input
          className="unit-in"
          aria-label={`Unit of ${p.name}`}
          placeholder="unit"
          key={`u:${p.unit ?? ''}`}
          defaultValue={p.unit ?? ''}
          onBlur={(e) => e.target.value !== (p.unit ?? '') && st.updateParameter(p.name, { unit: e.target.value || undefined })}
        />
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
        <button type="button" className="icon" aria-label={`Remove parameter ${p.name}`} title="Remove" onClick={() => st.removeParameter(p.name)}>
          ×
        </button>
      </div>
      {problem && (
        <div className="field-error small" role="alert">
          {problem}
        </div>
      )}
      <div className="param-line">
        <NumberCell className="range" label={`Slider minimum of ${p.name}`} value={p.min} onCommit={(v) => st.updateParameter(p.name, { min: v })} />
        <input
          type="range"
          min={0}
          max={1000}
          step={1}
          aria-label={`Slider for ${p.name}`}
          aria-valuetext={`${p.name} = ${compact(p.value)}${p.unit ? ` ${p.unit}` : ''}`}
          value={sliderPos(p, lo, hi)}
          onPointerDown={beginGesture}
          onPointerUp={endGesture}
          onKeyUp={endGesture}
          onKeyDown={beginGesture}
          onBlur={endGesture}
          onChange={(e) => st.setParameterValue(p.name, sliderValue(p, lo, hi, Number(e.target.value)))}
        />
        <NumberCell className="range" label={`Slider maximum of ${p.name}`} value={p.max} onCommit={(v) => st.updateParameter(p.name, { max: v })} />
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
