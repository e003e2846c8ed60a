import { deadlineIn } from '@loopwright/lti';
import { errorAt, isBudgetError, isInputError } from '@loopwright/study';
import { toJson } from './args.ts';
import { commands } from './commands/index.ts';
import { UsageError, WriteError, type CliIo } from './io.ts';

const overview = () =>
  [
    'loopwright — analyse and simulate multi-loop feedback diagrams',
    '',
    'usage: npx loopwright <command> [options]   (npx loopwright <command> --help for each)',
    '',
    ...commands.map((c) => `  ${c.name.padEnd(10)} ${c.summary}`),
    '',
    'A diagram FILE given as "-" is read from standard input. With --json, an error is written',
    'as {"error": {"message": ..., "at": ...}} on standard output as well as in words on',
    'standard error. Exit codes: 0 done, 2 bad input (or a result that could not be written, or',
    'an analysis past its time or size budget), 1 internal failure or a run that stopped early.',
    `Every command ends within its time limit: --time-limit SECONDS (default ${DEFAULT_TIME_LIMIT_S}) on any`,
    'command; past it the analysis stops with a message naming what ran out (exit 2).',
    '',
    'Results are design aids: validate on the real plant with limits and interlocks in place,',
    'and follow the applicable functional-safety standards, local codes and licensed practice.',
    '',
  ].join('\n');

/** Wall-time budget of one command when --time-limit is not given (s). */
export const DEFAULT_TIME_LIMIT_S = 20;

/** --time-limit SECONDS (or --time-limit=SECONDS), taken out of a command's words: every command accepts it. */
export function takeTimeLimit(words: readonly string[]): { rest: string[]; seconds: number } {
  const rest: string[] = [];
  let seconds = DEFAULT_TIME_LIMIT_S;
  for (let i = 0; i < words.length; i++) {
    const w = words[i];
    let v: string | undefined;
    if (w === '--time-limit') {
      v = words[++i];
      if (v === undefined) throw new UsageError('flag --time-limit needs a value (seconds)', '--time-limit');
    } else if (w.startsWith('--time-limit=')) v = w.slice('--time-limit='.length);
    else {
      rest.push(w);
      continue;
    }
    const x = Number(v);
    if (v.trim() === '' || !(x > 0) || !Number.isFinite(x))
      throw new UsageError(`--time-limit: "${v}" is not a number of seconds above 0`, '--time-limit');
    seconds = x;
  }
  return { rest, seconds };
}

/** Runs one command; returns the process exit code (0 ok, 2 bad input, 1 internal failure). */
export async function main(argv: string[], io: CliIo): Promise<number> {
  const [name, ...words] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    io.stdout(overview());
    return name ? 0 : 2;
  }
  const cmd = commands.find((c) => c.name === name);
  if (!cmd) {
    io.stderr(`loopwright: unknown command "${name}"\n\n${overview()}`);
    return 2;
  }
  if (words.includes('--help') || words.includes('-h')) {
    const text = cmd.help.endsWith('\n') ? cmd.help : cmd.help + '\n';
    io.stdout(
      `${text}\nEvery command: --time-limit SECONDS  stop past this wall time with a message naming what ran out (exit 2; default ${DEFAULT_TIME_LIMIT_S})\n`,
    );
    return 0;
  }
  let seconds = DEFAULT_TIME_LIMIT_S;
  try {
    const limited = takeTimeLimit(words);
    seconds = limited.seconds;
    return await cmd.run(limited.rest, io, { deadline: deadlineIn(seconds * 1000) });
  } catch (err) {
    const report = errorReport(err);
    const { code, at } = report;
    const message = isBudgetError(err)
      ? `${report.message}: the time limit is ${seconds} s (--time-limit SECONDS to change it)`
      : report.message;
    // --json callers parse standard output: the error goes there too, as JSON.
    if (words.includes('--json')) io.stdout(toJson({ error: { message, at } }));
    io.stderr(`loopwright ${name}: ${message}\n`);
    return code;
  }
}

/**
 * Exit code and words for an error: 2 for what the user can act on — bad input (usage, the
 * engine's InputError), a result that could not be written, an analysis past its time or size
 * budget — and 1, said to be internal, for anything else.
 */
export function errorReport(err: unknown): { code: 1 | 2; message: string; at: string | null } {
  const msg = err instanceof Error ? err.message : String(err);
  const expected = err instanceof UsageError || err instanceof WriteError || isInputError(err) || isBudgetError(err);
  return { code: expected ? 2 : 1, message: expected ? msg : `internal error: ${msg}`, at: atOf(err) };
}

function atOf(err: unknown): string | null {
  if (err instanceof UsageError || err instanceof WriteError) return err.at;
  return errorAt(err);
}
