import { fmt, type Settings } from './options.ts';
import type { SimStatus } from './types.ts';

const now = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

/**
 * The run's status and its limits: the step and wall-time budgets, cancellation and progress.
 * `stop` ends the run with a status that is not ok and a message naming the cause and the time
 * reached; the partial traces are kept.
 */
export class Budget {
  status: SimStatus = 'ok';
  message = '';
  stopped = false;
  /** Simulated time reached. */
  reached = 0;
  steps = 0;
  private lastProgress = 0;
  readonly wall0 = now();

  constructor(
    private readonly s: Settings,
    private readonly isCancelled?: () => boolean,
    private readonly onProgress?: (fraction: number) => void,
  ) {}

  stop(status: SimStatus, message: string): void {
    this.status = status;
    this.message = message;
    this.stopped = true;
  }

  /** Cancellation, wall time and progress at simulated time `at`; true when the run must stop. */
  check(at: number): boolean {
    if (this.isCancelled?.()) {
      this.stop('cancelled', `cancelled at t = ${fmt(at)} s`);
      return true;
    }
    if (now() - this.wall0 > this.s.maxWallMs) {
      this.stop('budget', `the wall-time budget of ${this.s.maxWallMs} ms ran out at t = ${fmt(at)} s`);
      return true;
    }
    if (this.onProgress && at / this.s.until >= this.lastProgress + 0.01) {
      this.lastProgress = at / this.s.until;
      this.onProgress(Math.min(1, this.lastProgress));
    }
    return false;
  }

  /** The step budget, counted by the engine; true when it ran out (the run is stopped). */
  stepsSpent(at: number): boolean {
    if (this.steps < this.s.maxSteps) return false;
    this.stop('budget', `the step budget of ${this.s.maxSteps} steps ran out at t = ${fmt(at)} s`);
    return true;
  }

  finish(): void {
    if (!this.stopped) {
      this.message = `completed at t = ${fmt(this.s.until)} s`;
      this.reached = this.s.until;
      this.onProgress?.(1);
    }
  }

  elapsed(): number {
    return now() - this.wall0;
  }
}
