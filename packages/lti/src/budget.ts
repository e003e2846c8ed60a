import { BudgetError } from './errors.ts';

/**
 * The budget option every analysis entry point accepts: `deadline` is a time on the
 * `performance.now()` clock (ms) after which the analysis stops with a BudgetError('time').
 * Without one an analysis still ends: every search here is bounded by size caps; the deadline
 * lets a caller (a CLI command, an editor request) bound the wall time as well.
 */
export interface BudgetOptions {
  deadline?: number;
}

type Clock = { now(): number };
// `performance` exists in browsers, workers and Node, but the pure packages are typed without
// DOM or Node declarations: reach it through globalThis.
const clock: Clock = (globalThis as { performance?: Clock }).performance ?? { now: () => Date.now() };

/** The current time on the clock deadlines refer to (ms). */
export const budgetNow = (): number => clock.now();

/** A deadline `ms` milliseconds from now (for callers that think in durations). */
export const deadlineIn = (ms: number): number => clock.now() + ms;

/**
 * Throws BudgetError('time') once the deadline has passed; `what` names the analysis in the
 * message. Cheap enough for inner loops (one clock read); no-op without a deadline.
 */
export function checkDeadline(deadline: number | undefined, what: string): void {
  if (deadline === undefined) return;
  if (clock.now() > deadline) throw new BudgetError(`${what}: stopped at its time budget (deadline passed)`, 'time');
}

/**
 * A deadline checker for hot loops: reads the clock only every `every` calls. `tick()` throws
 * BudgetError('time') past the deadline.
 */
export function deadlineTicker(deadline: number | undefined, what: string, every = 64): { tick(): void } {
  if (deadline === undefined) return { tick() {} };
  let n = 0;
  return {
    tick() {
      if (++n % every === 0) checkDeadline(deadline, what);
    },
  };
}
