import type { TransferFunction } from '@loopwright/lti';
import type { ParamValue } from '../document-types.ts';

/**
 * One editable field of a block kind.
 * - `number`: a number, or an expression text over the diagram's named parameters ("Kp", "2*Kv");
 * - `expression`: a text in `s` and named parameters (the transfer-function block);
 * - `choice`: one of `choices`;  `text`: free text (e.g. summing-junction signs).
 * `min`/`max` are the physical-sense limits: a resolved value outside them is an input error
 * (`exclusiveMin` makes the lower limit strict). `blank` is the value an empty text or an
 * absent field stands for where "no value" has a meaning (e.g. no output limit → ±Infinity).
 */
export interface ParamSpec {
  name: string;
  label: string;
  unit?: string;
  type: 'number' | 'expression' | 'choice' | 'text';
  default: number | string;
  choices?: readonly string[];
  min?: number;
  max?: number;
  exclusiveMin?: boolean;
  blank?: number;
  /** A number whose unit another field (a choice) gives, e.g. a frequency in Hz or rad/s; it replaces `unit`. */
  unitFrom?: string;
  /** For `text` fields: a pattern the text must match, and how to say it in a message. */
  pattern?: RegExp;
  patternHint?: string;
  description?: string;
}

/** Block parameters after evaluation: numbers are numbers, choices and texts stay strings. */
export type ResolvedParams = { readonly [name: string]: number | string | boolean };

/** Block parameters as the document stores them (numbers, expression texts, choices; absent = default). */
export type StoredParams = Readonly<Record<string, ParamValue | undefined>>;

/**
 * The small-signal (linear) view of a block, used by reduction and analysis:
 * a transfer function from its single input to its output, a signed sum of its inputs,
 * a source (an injection point) or a probe (a measurement point).
 */
export type LinearForm =
  { type: 'transfer'; tf: TransferFunction } | { type: 'sum'; signs: number[] } | { type: 'source' } | { type: 'probe' };

/**
 * What a block's card shows, as plain data (the editor draws it). `formula` is a text in the
 * transfer-function expression syntax over `s`, numbers and names ("2/(T1*s + 1)",
 * "exp(-0.1*s)"); the editor sets it with stacked fractions, powers and subscripts.
 */
export interface CardContent {
  formula?: string;
  /** A short line under the formula, or instead of it (limits, source shape, notch figures). */
  caption?: string;
}

/** One stroke of a card's small line drawing, in a 40 × 20 box; `ghost` strokes are drawn faint. */
export interface IconStroke {
  d: string;
  ghost?: boolean;
}

/**
 * Everything about one block kind, in one place: the document schema, the editor (Parts,
 * Details, the card), reduction, simulation and the command line all read it from here.
 */
export interface BlockSpec<K extends string = string> {
  kind: K;
  title: string;
  description: string;
  category: 'linear' | 'nonlinear' | 'signal';
  /** New blocks of this kind get ids `${idPrefix}1`, `${idPrefix}2`, … (short ids keep documents easy to diff). */
  idPrefix: string;
  params: ParamSpec[];
  /**
   * Whether a field matters for the block as configured (the PID shows its chosen form's gains,
   * a source the fields of its shape). Absent: every field. Hidden fields keep their values.
   */
  shows?(field: string, p: StoredParams): boolean;
  /** What the card shows, from the stored fields (never throws: a half-typed field shows as typed or as a placeholder). */
  card(p: StoredParams): CardContent;
  /** A small drawing on the card (the static nonlinearities' characteristics, the notch's dip). */
  icon?: readonly IconStroke[];
  /** Input port names; they can depend on the parameters (summing junction: one per sign). */
  inputs(params: ResolvedParams | Readonly<Record<string, unknown>>): string[];
  outputs: string[];
  /**
   * The linear form. `scope` holds the named-parameter values (with overrides) for blocks whose
   * parameter is an expression in `s` (transfer function). Throws InputError for values that
   * make no sense (e.g. a negative time constant), naming the field.
   */
  linear(p: ResolvedParams, scope?: Readonly<Record<string, number>>): LinearForm;
  /**
   * The block limits the signal it puts out (an actuator limit): a run records its output and
   * reports it as an actuator (time at a limit, peak effort). `lower`/`upper` name the fields
   * holding the value limits (none for a rate limit); `onlyWithLimits`: an actuator only when
   * one of those limits is set (a PID without output limits is not one).
   */
  actuator?: { lower?: string; upper?: string; onlyWithLimits?: boolean };
  /** Fills derived defaults after resolution (e.g. the PID tracking time when blank). */
  complete?(p: Record<string, number | string | boolean>): void;
}

/** Declares a block kind; its `kind` stays a literal type, so `BlockKind` is derived from the catalogue. */
export function defineBlock<const K extends string>(spec: BlockSpec<K>): BlockSpec<K> {
  return spec;
}

/** The unit a number field is shown in for these stored or resolved fields (its `unitFrom` choice, else `unit`). */
export function unitOf(spec: ParamSpec, params: Readonly<Record<string, unknown>>, all?: readonly ParamSpec[]): string | undefined {
  if (!spec.unitFrom) return spec.unit;
  const v = params[spec.unitFrom];
  if (typeof v === 'string' && v !== '') return v;
  const d = all?.find((p) => p.name === spec.unitFrom)?.default;
  return typeof d === 'string' ? d : spec.unit;
}
