import { parseArgs as parseNodeArgs } from 'node:util';
import { UsageError, type ParsedArgs } from './io.ts';

/**
 * Splits argv into positionals and flags with node:util parseArgs (strict: unknown flags and
 * missing values are refused by name). Value flags may repeat (`--set A=1 --set B=2`); every
 * flag takes `--name value` or `--name=value`; a value starting with "-" needs the `=` form;
 * a lone "-" is a positional (standard input).
 */
export function parseArgs(argv: string[], valueFlags: string[], booleanFlags: string[]): ParsedArgs {
  const options: Record<string, { type: 'string' | 'boolean'; multiple: true; short?: string }> = {};
  for (const f of valueFlags) options[f] = { type: 'string', multiple: true };
  for (const f of booleanFlags) options[f] = { type: 'boolean', multiple: true };
  options.help = { type: 'boolean', multiple: true, short: 'h' };
  let parsed: ReturnType<typeof parseNodeArgs>;
  try {
    parsed = parseNodeArgs({ args: argv, options, allowPositionals: true, strict: true });
  } catch (err) {
    throw usageOf(err);
  }
  const flags = new Map<string, string[]>();
  for (const [name, v] of Object.entries(parsed.values)) {
    const list = (Array.isArray(v) ? v : [v]) as (string | boolean)[];
    if (list.some((x) => x === false)) continue;
    flags.set(
      name,
      list.map((x) => (typeof x === 'string' ? x : '')),
    );
  }
  return { positional: parsed.positionals, flags };
}

/** node:util's parse errors in the words of our other messages. */
function usageOf(err: unknown): UsageError {
  const msg = err instanceof Error ? err.message : String(err);
  const code = (err as { code?: string }).code;
  const flag = /'(-[^' ]+)/.exec(msg)?.[1] ?? '';
  if (code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION') return new UsageError(`unknown flag ${flag}`, flag);
  if (code === 'ERR_PARSE_ARGS_UNEXPECTED_POSITIONAL') return new UsageError(`unexpected argument: ${msg}`);
  if (code === 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE') {
    if (/does not take an argument/.test(msg)) return new UsageError(`flag ${flag} takes no value`, flag);
    if (/argument missing/.test(msg)) return new UsageError(`flag ${flag} needs a value`, flag);
    if (/ambiguous/.test(msg)) return new UsageError(`flag ${flag}: a value starting with "-" is written ${flag}=VALUE`, flag);
  }
  return new UsageError(msg);
}

export const has = (a: ParsedArgs, name: string) => a.flags.has(name);
export const one = (a: ParsedArgs, name: string): string | undefined => {
  const v = a.flags.get(name);
  if (!v) return undefined;
  if (v.length > 1) throw new UsageError(`flag --${name} given more than once`, `--${name}`);
  return v[0];
};
export const all = (a: ParsedArgs, name: string): string[] => a.flags.get(name) ?? [];

/** Parses NAME=VALUE pairs (from --param or --set) into a record; names the bad pair. */
export function parseAssignments(pairs: string[], flag: string): Record<string, number> {
  const out: Record<string, number> = Object.create(null);
  for (const pair of pairs) {
    const m = /^([A-Za-z_][A-Za-z0-9_]*)=(.+)$/.exec(pair);
    if (!m) throw new UsageError(`--${flag} "${pair}": expected NAME=VALUE, e.g. --${flag} Kp=2.5`, `--${flag}`);
    const value = Number(m[2]);
    if (!Number.isFinite(value)) throw new UsageError(`--${flag} ${m[1]}: "${m[2]}" is not a finite number`, `--${flag}`);
    out[m[1]] = value;
  }
  return out;
}

/** Parses a finite number flag, naming the flag on failure. */
export function numberFlag(a: ParsedArgs, name: string): number | undefined {
  const v = one(a, name);
  if (v === undefined) return undefined;
  const x = Number(v);
  if (v.trim() === '' || !Number.isFinite(x)) throw new UsageError(`--${name}: "${v}" is not a finite number`, `--${name}`);
  return x;
}

/** JSON with non-finite numbers written as null (JSON has no Infinity). */
export function toJson(value: unknown): string {
  return JSON.stringify(value, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n';
}
