import { InputError, type TransferFunction, formatExpressionError, parseTransferFunction } from '@loopwright/lti';
import { all, one, parseAssignments } from '../args.ts';
import { UsageError, type ParsedArgs } from '../io.ts';

/**
 * The `--loop "<expression>" [--param NAME=VALUE ...]` input shared by `locus` and `margins`.
 * A parse error is re-thrown with the expression and a caret under the fault, so the terminal
 * shows where the text is wrong.
 */
export function loopFromArgs(a: ParsedArgs, command: string): { text: string; tf: TransferFunction } {
  const text = one(a, 'loop');
  if (text === undefined) throw new UsageError(`${command}: give the loop as --loop "<expression>" (see --help)`);
  if (text.trim() === '') throw new UsageError(`${command}: --loop is empty`);
  const params = parseAssignments(all(a, 'param'), 'param');
  try {
    return { text, tf: parseTransferFunction(text, params) };
  } catch (err) {
    if (err instanceof InputError) {
      // Text and caret on lines of their own, indented alike, so the caret sits under the fault.
      const lines = formatExpressionError(text, err).split('\n');
      const shown = lines.length === 3 ? `\n  ${lines[0]}\n  ${lines[1]}\n${lines[2]}` : ` ${lines.join(' ')}`;
      throw new InputError(`--loop expression:${shown}`, err.details);
    }
    throw err;
  }
}
