/**
 * Live validation of one block field: the block with the candidate value is resolved and its
 * linear form built exactly as analysis will, and an InputError about THIS field is returned
 * with its character position (for expressions) and length.
 */
import { InputError } from '@loopwright/lti';
import { linearFormWithScope, parameterScope } from '@loopwright/graph';
import type { Block, Diagram, ParamSpec, ParamValue } from '../store/graph-bridge.ts';

export interface FieldProblem {
  message: string;
  position?: number;
  length?: number;
}

/** Drops the "block x field y: "text":" lead-in the panel already shows. */
export function shortMessage(msg: string): string {
  return msg
    .replace(/^block \S+ field \S+: /, '')
    .replace(/^field \S+: /, '')
    .replace(/^"(?:[^"\\]|\\.)*": /, '');
}

export function validateField(d: Diagram, block: Block, name: string, value: ParamValue): FieldProblem | null {
  const candidate: Block = { ...block, params: { ...block.params, [name]: value } };
  try {
    linearFormWithScope(candidate, parameterScope(d));
    return null;
  } catch (err) {
    if (!(err instanceof InputError)) return { message: String((err as Error)?.message ?? err) };
    const field = err.details.field ?? '';
    // Errors about another field are that field's business (shown there).
    if (field && !field.endsWith(`.params.${name}`) && field !== name) return null;
    if (!field && !err.message.includes(`field ${name}`)) return null;
    return { message: shortMessage(err.message), position: err.details.position, length: err.details.length };
  }
}

/** The document value a typed text stands for: a plain number becomes a number; else text. */
export function valueFromText(spec: ParamSpec, text: string): ParamValue {
  if (spec.type === 'number') {
    const t = text.trim();
    if (/^[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?$/.test(t)) return Number(t);
    return t;
  }
  return text;
}

export function textFromValue(v: ParamValue | undefined): string {
  if (v === undefined) return '';
  return String(v);
}
