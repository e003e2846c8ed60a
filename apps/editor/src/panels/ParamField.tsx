/**
 * One block field in Details. The text is a draft while typing; it is checked on every key
 * (errors show their message and, for expressions, the characters at fault underlined) and it
 * is written to the document only when valid, on Enter or leaving the field. Escape reverts.
 */
import { useEffect, useId, useState } from 'react';
import { blockSpec, unitOf, type Block, type Diagram, type ParamSpec, type ParamValue } from '../store/graph-bridge.ts';
import { useDiagramStore } from '../store/diagram-store.ts';
import { textFromValue, validateField, valueFromText, type FieldProblem } from './validate.ts';

interface Props {
  diagram: Diagram;
  block: Block;
  spec: ParamSpec;
  onCommit(value: ParamValue): void;
}

function rangeHint(spec: ParamSpec): string | null {
  const lo = spec.min !== undefined ? `${spec.exclusiveMin ? '>' : '≥'} ${spec.min}` : null;
  const hi = spec.max !== undefined ? `≤ ${spec.max}` : null;
  if (!lo && !hi) return null;
  return [lo, hi].filter(Boolean).join(', ');
}

export function ParamField({ diagram, block, spec, onCommit }: Props) {
  const id = useId();
  const stored = textFromValue(block.params[spec.name] as ParamValue | undefined);
  const [draft, setDraft] = useState(stored);
  const [problem, setProblem] = useState<FieldProblem | null>(null);
  useEffect(() => {
    setDraft(stored);
    setProblem(null);
  }, [stored, block.id]);

  // Re-check when the draft or the named parameters change.
  useEffect(() => {
    setProblem(validateField(diagram, block, spec.name, valueFromText(spec, draft)));
  }, [draft, diagram.parameters, block, spec, diagram]);

  const commit = () => {
    const value = valueFromText(spec, draft);
    if (validateField(diagram, block, spec.name, value)) return;
    if (String(value) !== stored || typeof value !== typeof block.params[spec.name]) onCommit(value);
  };

  if (spec.type === 'choice') {
    return (
      <div className="field">
        <label htmlFor={id}>{spec.label}</label>
        <select
          id={id}
          aria-label={spec.label}
          value={stored || String(spec.default)}
          onChange={(e) => onCommit(e.target.value)}
          title={spec.description}
        >
          {spec.choices?.map((c) => (
            <option key={c} value={c}>
              {c}
            </option>
          ))}
        </select>
      </div>
    );
  }

  const hint = rangeHint(spec);
  const unit = unitOf(spec, block.params, blockSpec(block.kind).params);
  const pos = problem?.position;
  const len = Math.max(1, problem?.length ?? 1);
  return (
    <div className={`field${problem ? ' has-error' : ''}`}>
      <label htmlFor={id}>
        {spec.label}
        {unit && <span className="unit"> [{unit}]</span>}
      </label>
      <input
        id={id}
        aria-label={spec.label}
        aria-invalid={problem ? true : undefined}
        aria-describedby={problem ? `${id}-err` : undefined}
        className={spec.type === 'expression' ? 'mono' : undefined}
        value={draft}
        spellCheck={false}
        placeholder={spec.blank !== undefined ? 'blank = none' : undefined}
        title={[spec.description, hint && `valid: ${hint}`].filter(Boolean).join(' — ') || undefined}
        onChange={(e) => setDraft(e.target.value)}
        onBlur={commit}
        onKeyDown={(e) => {
          if (e.key === 'Enter') {
            e.preventDefault();
            commit();
          } else if (e.key === 'Escape') {
            setDraft(stored);
          }
        }}
      />
      {problem && (
        <div className="field-error" id={`${id}-err`} role="alert" aria-label={`${spec.label} error`}>
          {pos !== undefined && (
            <div className="echo mono" aria-hidden="true">
              <span>{draft.slice(0, pos)}</span>
              <span className="echo-bad">{draft.slice(pos, pos + len) || ' '}</span>
              <span>{draft.slice(pos + len)}</span>
            </div>
          )}
          <div className="msg">
            {problem.message}
            {pos !== undefined && (
              <span className="pos" data-position={pos}>
                {' '}
                (at character {pos + 1})
              </span>
            )}
          </div>
          {(() => {
            // A name that is not a parameter yet: offer to create it (value 1) rather than make the user go elsewhere.
            const m = /unknown parameter '([A-Za-z_][A-Za-z0-9_]*)'/.exec(problem.message);
            if (!m) return null;
            return (
              <button
                type="button"
                className="create"
                aria-label={`Create parameter ${m[1]}`}
                onClick={() => {
                  const st = useDiagramStore.getState();
                  st.addParameter({ name: m[1], value: 1 });
                  const value = valueFromText(spec, draft);
                  if (!validateField(useDiagramStore.getState().diagram, block, spec.name, value)) onCommit(value);
                }}
              >
                Create parameter {m[1]}
              </button>
            );
          })()}
        </div>
      )}
      {!problem && hint && (
        <div className="field-hint">
          {hint}
          {unit ? ` ${unit}` : ''}
        </div>
      )}
    </div>
  );
}
