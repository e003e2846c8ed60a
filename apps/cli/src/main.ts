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
    '',
    'Results are design aids: validate on the real plant with limits and interlocks in place,',
    'and follow the applicable functional-safety standards, local codes and licensed practice.',
    '',
  ].join('\n');

/** Runs one command; returns the process exit code (0 ok, 2 bad input, 1 internal failure). */
export async function main(argv: string[], io: CliIo): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    io.stdout(overview());
    return name ? 0 : 2;
  }
  const cmd = commands.find((c) => c.name === name);
  if (!cmd) {
    io.stderr(`loopwright: unknown command "${name}"\n\n${overview()}`);
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    io.stdout(cmd.help.endsWith('\n') ? cmd.help : cmd.help + '\n');
    return 0;
  }
  try {
    return await cmd.run(rest, io);
  } catch (err) {
    const { code, message, at } = errorReport(err);
    // --json callers parse standard output: the error goes there too, as JSON.
    if (rest.includes('--json')) io.stdout(toJson({ error: { message, at } }));
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
