import { UsageError, type ParsedArgs } from './io.ts';

/**
 * Splits argv into positionals and flags. `booleanFlags` take no value; every other flag takes
 * the next word (or the part after `=`). Unknown flags are refused by name.
 */
export function parseArgs(argv: string[], valueFlags: string[], booleanFlags: string[]): ParsedArgs {
  const flags = new Map<string, string[]>();
  const positional: string[] = [];
  const add = (k: string, v: string) => {
    const list = flags.get(k) ?? [];
    list.push(v);
    flags.set(k, list);
  };
  for (let i = 0; i < argv.length; i++) {
    const word = argv[i];
    if (!word.startsWith('--') || word === '--') {
      positional.push(word);
      continue;
    }
    const eq = word.indexOf('=');
    const name = eq >= 0 ? word.slice(2, eq) : word.slice(2);
    if (booleanFlags.includes(name) || name === 'help') {
      if (eq >= 0) throw new UsageError(`flag --${name} takes no value`);
      add(name, '');
    } else if (valueFlags.includes(name)) {
      const value = eq >= 0 ? word.slice(eq + 1) : argv[++i];
      if (value === undefined) throw new UsageError(`flag --${name} needs a value`);
      add(name, value);
    } else {
      throw new UsageError(`unknown flag --${name}`);
    }
  }
  return { positional, flags };
}

export const has = (a: ParsedArgs, name: string) => a.flags.has(name);
export const one = (a: ParsedArgs, name: string): string | undefined => {
  const v = a.flags.get(name);
  if (!v) return undefined;
  if (v.length > 1) throw new UsageError(`flag --${name} given more than once`);
  return v[0];
};
export const all = (a: ParsedArgs, name: string): string[] => a.flags.get(name) ?? [];

/** Parses NAME=VALUE pairs (from --param or --set) into a record; names the bad pair. */
export function parseAssignments(pairs: string[], flag: string): Record<string, number> {
  const out: Record<string, number> = Object.create(null);
  for (const pair of pairs) {
    const m = /^([A-Za-z_][A-Za-z0-9_]*)=(.+)$/.exec(pair);
    if (!m) throw new UsageError(`--${flag} "${pair}": expected NAME=VALUE, e.g. --${flag} Kp=2.5`);
    const value = Number(m[2]);
    if (!Number.isFinite(value)) throw new UsageError(`--${flag} ${m[1]}: "${m[2]}" is not a finite number`);
    out[m[1]] = value;
  }
  return out;
}

/** Parses a finite number flag, naming the flag on failure. */
export function numberFlag(a: ParsedArgs, name: string): number | undefined {
  const v = one(a, name);
  if (v === undefined) return undefined;
  const x = Number(v);
  if (v.trim() === '' || !Number.isFinite(x)) throw new UsageError(`--${name}: "${v}" is not a finite number`);
  return x;
}

/** JSON with non-finite numbers written as null (JSON has no Infinity). */
export function toJson(value: unknown): string {
  return JSON.stringify(value, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n';
}
