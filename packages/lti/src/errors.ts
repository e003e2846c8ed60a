/**
 * An error in what the user gave us (text, numbers, a diagram), as opposed to a bug.
 * `inputError` lets callers (CLI exit code 2, editor messages) tell the two apart without
 * importing this class; `position` is a 0-based character offset into the text at fault.
 */
export class InputError extends Error {
  override name = 'InputError';
  readonly inputError = true;
  constructor(
    message: string,
    readonly details: { position?: number; field?: string; length?: number } = {},
  ) {
    super(message);
  }
}

/**
 * An analysis stopped because it ran past its deadline (`time`), would have produced more
 * output than a result may hold (`size`), or took more iterations than any sound input needs
 * (`steps`). Not a bug and not bad input: the CLI maps it to exit 2 with its message, the
 * editor's worker reports it as a failed part of a result. `budget` lets callers recognise it
 * without importing this class.
 */
export class BudgetError extends Error {
  override name = 'BudgetError';
  readonly budget = true;
  constructor(
    message: string,
    readonly reason: 'time' | 'size' | 'steps',
  ) {
    super(message);
  }
}

/** Throws an InputError unless every number is finite; `what` names the field. */
export function assertFinite(values: ArrayLike<number>, what: string): void {
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) {
      throw new InputError(`${what}: element ${i} is ${v}, not a finite number`, { field: what });
    }
  }
}

/** The largest polynomial degree / system order accepted anywhere (keeps every routine bounded). */
export const MAX_ORDER = 60;
