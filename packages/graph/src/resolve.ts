import { InputError, parseScalar } from '@loopwright/lti';
import { blockSpec, unitOf } from './catalogue/index.ts';
import type { LinearForm, ParamSpec, ResolvedParams } from './catalogue/types.ts';
import type { Block, Diagram } from './document-types.ts';

/** Overrides of named parameters (a sweep value, a CLI `--set`), keyed by parameter name. */
export type ParameterOverrides = Readonly<Record<string, number>>;

/**
 * The values expressions see: the diagram's named parameters, then the overrides. A
 * null-prototype record, so that a parameter called "constructor" or "toString" cannot reach
 * Object.prototype.
 */
export function parameterScope(diagram: Pick<Diagram, 'parameters'>, overrides?: ParameterOverrides): Record<string, number> {
  const scope: Record<string, number> = Object.create(null);
  for (const p of diagram.parameters) scope[p.name] = p.value;
  if (overrides) {
    for (const name of Object.keys(overrides)) {
      const v = overrides[name];
      if (typeof v !== 'number' || !Number.isFinite(v)) {
        throw new InputError(`override ${name}: ${v} is not a finite number`, { field: name });
      }
      scope[name] = v;
    }
  }
  return scope;
}

const fieldError = (block: Block, spec: ParamSpec, message: string, position?: number, length?: number) =>
  new InputError(`block ${block.id} field ${spec.name}: ${message}`, {
    field: `blocks.${block.id}.params.${spec.name}`,
    ...(position !== undefined ? { position } : {}),
    ...(length !== undefined ? { length } : {}),
  });

function resolveNumber(block: Block, spec: ParamSpec, raw: unknown, scope: Record<string, number>): number {
  let value: number;
  if (raw === undefined || (typeof raw === 'string' && raw.trim() === '')) {
    if (spec.blank !== undefined) return spec.blank;
    if (raw === undefined && typeof spec.default === 'number') return spec.default;
    throw fieldError(block, spec, 'a value is required');
  }
  if (typeof raw === 'number') {
    value = raw;
  } else if (typeof raw === 'string' && quickValue(raw, scope) !== undefined) {
    value = quickValue(raw, scope)!;
  } else if (typeof raw === 'string') {
    try {
      value = parseScalar(raw, scope);
    } catch (err) {
      if (err instanceof InputError) {
        throw fieldError(block, spec, `"${raw}": ${err.message}`, err.details.position, err.details.length);
      }
      throw err;
    }
  } else {
    throw fieldError(block, spec, `expected a number or an expression, got ${typeof raw}`);
  }
  if (!Number.isFinite(value)) throw fieldError(block, spec, `${value} is not a finite number`);
  const belowMin = spec.min !== undefined && (spec.exclusiveMin ? !(value > spec.min) : !(value >= spec.min));
  const aboveMax = spec.max !== undefined && !(value <= spec.max);
  if (belowMin || aboveMax) {
    const u = unitOf(spec, block.params ?? {}, blockSpec(block.kind).params);
    const unit = u ? ` ${u}` : '';
    if (belowMin) throw fieldError(block, spec, `${value}${unit} must be ${spec.exclusiveMin ? 'above' : 'at least'} ${spec.min}${unit}`);
    throw fieldError(block, spec, `${value}${unit} must be at most ${spec.max}${unit}`);
  }
  return value;
}

const BARE_NAME = /^\s*([A-Za-z_][A-Za-z0-9_]*)\s*$/;
const PLAIN_NUMBER = /^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*$/;
/**
 * The value of the commonest field texts without running the expression parser: a bare
 * named parameter ("Kp") or a plain number ("0.5"). Anything else (or a name the scope lacks,
 * or `s`) returns undefined and goes through parseScalar, which gives the positioned error.
 */
function quickValue(text: string, scope: Record<string, number>): number | undefined {
  const m = BARE_NAME.exec(text);
  if (m) return m[1] !== 's' && Object.prototype.hasOwnProperty.call(scope, m[1]) ? scope[m[1]] + 0 : undefined; // + 0: no −0, as parseScalar
  if (PLAIN_NUMBER.test(text)) {
    const v = Number(text);
    return Number.isFinite(v) ? v + 0 : undefined;
  }
  return undefined;
}

/** Names used by a field text; a bare name without running the parser (see quickValue). */
export function fieldParameters(text: string, parse: (t: string) => string[]): string[] {
  const m = BARE_NAME.exec(text);
  if (m && m[1] !== 's' && m[1] !== 'exp') return [m[1]];
  if (PLAIN_NUMBER.test(text)) return [];
  return parse(text);
}

/**
 * Evaluates a block's parameters: numeric fields given as expressions ("Kp", "2*Kv") over the
 * named parameters + overrides, blanks to their meaning (e.g. no limit → ±Infinity), absent
 * fields to their defaults. Texts and choices are checked and passed through; the
 * transfer-function `expression` stays text (it is parsed in `s` by the block's linear form).
 * Throws InputError naming `block <id> field <name>`.
 */
export function resolveParams(diagram: Pick<Diagram, 'parameters'>, block: Block, overrides?: ParameterOverrides): ResolvedParams {
  return resolveWithScope(block, parameterScope(diagram, overrides));
}

export function resolveWithScope(block: Block, scope: Record<string, number>): ResolvedParams {
  const spec = blockSpec(block.kind);
  const out: Record<string, number | string | boolean> = Object.create(null);
  const params = block.params ?? {};
  for (const ps of spec.params) {
    const raw = Object.prototype.hasOwnProperty.call(params, ps.name) ? params[ps.name] : undefined;
    switch (ps.type) {
      case 'number':
        out[ps.name] = resolveNumber(block, ps, raw, scope);
        break;
      case 'choice': {
        const v = raw === undefined ? ps.default : raw;
        if (typeof v !== 'string' || !ps.choices?.includes(v)) {
          throw fieldError(block, ps, `${JSON.stringify(v)} is not one of ${ps.choices?.map((c) => `"${c}"`).join(', ')}`);
        }
        out[ps.name] = v;
        break;
      }
      case 'text':
      case 'expression': {
        const v = raw === undefined ? ps.default : raw;
        if (typeof v !== 'string') throw fieldError(block, ps, `expected a text, got ${typeof v}`);
        if (ps.pattern && !ps.pattern.test(v)) throw fieldError(block, ps, `"${v}": expected ${ps.patternHint ?? ps.pattern.source}`);
        out[ps.name] = v;
        break;
      }
    }
  }
  spec.complete?.(out);
  return out;
}

/**
 * The block's linear form with its parameters resolved over the diagram's named parameters
 * (+ overrides). Errors from the block name it: `block <id> field <name>: …`.
 */
export function linearForm(diagram: Pick<Diagram, 'parameters'>, block: Block, overrides?: ParameterOverrides): LinearForm {
  const scope = parameterScope(diagram, overrides);
  return linearFormWithScope(block, scope);
}

export function linearFormWithScope(block: Block, scope: Record<string, number>): LinearForm {
  const p = resolveWithScope(block, scope);
  try {
    return blockSpec(block.kind).linear(p, scope);
  } catch (err) {
    if (err instanceof InputError) {
      const field = err.details.field;
      const msg = err.message.startsWith('field ') ? err.message : field ? `field ${field}: ${err.message}` : err.message;
      throw new InputError(`block ${block.id} ${msg}`, { ...err.details, field: `blocks.${block.id}.params.${field ?? ''}` });
    }
    throw err;
  }
}
