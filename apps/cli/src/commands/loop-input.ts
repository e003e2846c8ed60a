import { InputError, formatExpressionError } from '@loopwright/lti';
import type { ExpressionLoop } from '@loopwright/study';
import { all, one, parseAssignments } from '../args.ts';
import { UsageError, type ParsedArgs } from '../io.ts';

/** The `--loop "<expression>" [--param NAME=VALUE ...]` input shared by `locus` and `margins`. */
export function loopFromArgs(a: ParsedArgs, command: string): ExpressionLoop {
  const text = one(a, 'loop');
  if (text === undefined) throw new UsageError(`${command}: give the loop as --loop "<expression>" (see --help)`, '--loop');
  if (text.trim() === '') throw new UsageError(`${command}: --loop is empty`, '--loop');
  return { text, params: parseAssignments(all(a, 'param'), 'param') };
}

/**
 * Runs a study of the loop; a parse error is re-thrown with the expression and a caret under
 * the fault, so the terminal shows where the text is wrong.
 */
export function withCaret<T>(loop: ExpressionLoop, fn: () => T): T {
  try {
    return fn();
  } catch (err) {
    if (err instanceof InputError && err.details.position !== undefined) {
      // Text and caret on lines of their own, indented alike, so the caret sits under the fault.
      const lines = formatExpressionError(loop.text, err).split('\n');
      const shown = lines.length === 3 ? `\n  ${lines[0]}\n  ${lines[1]}\n${lines[2]}` : ` ${lines.join(' ')}`;
      throw new InputError(`--loop expression:${shown}`, err.details);
    }
    throw err;
  }
}
