import { commands } from './commands/index.ts';
import { UsageError, type CliIo } from './io.ts';

const overview = () =>
  [
    'loopwright — analyse and simulate multi-loop feedback diagrams',
    '',
    'usage: npx loopwright <command> [options]   (npx loopwright <command> --help for each)',
    '',
    ...commands.map((c) => `  ${c.name.padEnd(10)} ${c.summary}`),
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
    const msg = err instanceof Error ? err.message : String(err);
    if (isInputError(err)) {
      io.stderr(`loopwright ${name}: ${msg}\n`);
      return 2;
    }
    io.stderr(`loopwright ${name}: internal error: ${msg}\n`);
    return 1;
  }
}

/** Errors that mean "the input is wrong": usage errors and the engine's own input errors. */
function isInputError(err: unknown): boolean {
  if (err instanceof UsageError) return true;
  return err instanceof Error && (err as { inputError?: boolean }).inputError === true;
}
