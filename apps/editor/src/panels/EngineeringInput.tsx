/**
 * A number field in engineering notation. At rest it shows 4 significant digits ("50e-6",
 * "58.18"), so a small or long value never reads "0.000" or runs out of its box; the exact
 * value is in the tooltip and in the field while editing. It takes plain, exponent and
 * SI-prefixed text ("50u", "2.2k", "15 ms" with unit s), flags bad text as it is typed, and
 * writes only text the user actually changed, on Enter or leaving the field; Escape reverts.
 */
import { useRef, useState } from 'react';
import { formatEngineering, parseEngineering } from '@loopwright/lti';

interface Props {
  label: string;
  value: number | undefined;
  unit?: string;
  /** Empty text is allowed and means "no value" (slider limits). */
  optional?: boolean;
  className?: string;
  onCommit(v: number | undefined): void;
}

function problemOf(text: string, unit: string | undefined, optional: boolean | undefined, label: string): string | null {
  if (optional && text.trim() === '') return null;
  try {
    parseEngineering(text, { unit, field: label });
    return null;
  } catch (e) {
    return (e as Error).message;
  }
}

export function EngineeringInput({ label, value, unit, optional, className, onCommit }: Props) {
  // null while not editing: the field shows the rounded value. The ref holds the same text for
  // handlers that run before a re-render (Enter then blur must commit once; Escape none).
  const [draft, setDraftState] = useState<string | null>(null);
  const draftRef = useRef<string | null>(null);
  const setDraft = (t: string | null) => {
    draftRef.current = t;
    setDraftState(t);
  };
  const exact = value === undefined ? '' : formatEngineering(value, { digits: 17 });
  const shown = draft ?? (value === undefined ? '' : formatEngineering(value));
  const problem = draft === null ? null : problemOf(draft, unit, optional, label);
  const commit = () => {
    const text = draftRef.current;
    if (text === null) return;
    setDraft(null);
    if (problemOf(text, unit, optional, label) || text === exact) return;
    const v = text.trim() === '' ? undefined : parseEngineering(text, { unit, field: label });
    if (v !== value) onCommit(v);
  };
  const tip =
    value === undefined
      ? undefined
      : `${exact}${unit ? ` ${unit}` : ''}${unit && /^[A-Za-zΩ°]+$/.test(unit) ? ` (${formatEngineering(value, { style: 'si', unit, digits: 17 })})` : ''}`;
  return (
    <input
      className={`num ${className ?? ''}${problem ? ' invalid' : ''}`}
      aria-label={label}
      aria-invalid={problem ? true : undefined}
      title={problem ?? tip}
      value={shown}
      inputMode="decimal"
      spellCheck={false}
      onFocus={() => setDraft(exact)}
      onChange={(e) => setDraft(e.target.value)}
      onBlur={commit}
      onKeyDown={(e) => {
        if (e.key === 'Enter') {
          commit();
          (e.target as HTMLInputElement).blur();
        }
        if (e.key === 'Escape') {
          setDraft(null);
          (e.target as HTMLInputElement).blur();
        }
      }}
    />
  );
}
