import type { TransferFunction } from '@loopwright/lti';
import type { BlockKind } from '../document-types.ts';

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
  /** For `text` fields: a pattern the text must match, and how to say it in a message. */
  pattern?: RegExp;
  patternHint?: string;
  description?: string;
}

/** Block parameters after evaluation: numbers are numbers, choices and texts stay strings. */
export type ResolvedParams = { readonly [name: string]: number | string | boolean };

/**
 * The small-signal (linear) view of a block, used by reduction and analysis:
 * a transfer function from its single input to its output, a signed sum of its inputs,
 * a source (an injection point) or a probe (a measurement point).
 */
export type LinearForm =
  | { type: 'transfer'; tf: TransferFunction }
  | { type: 'sum'; signs: number[] }
  | { type: 'source' }
  | { type: 'probe' };

export interface BlockSpec {
  kind: BlockKind;
  title: string;
  description: string;
  category: 'linear' | 'nonlinear' | 'signal';
  params: ParamSpec[];
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
