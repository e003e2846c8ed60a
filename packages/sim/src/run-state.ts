import type { BuiltRun } from './build.ts';
import { Breakpoints } from './breakpoints.ts';
import type { Budget } from './budget.ts';
import type { CompiledModel } from './compile.ts';
import { ModeControl } from './modes.ts';
import type { Network } from './network.ts';
import type { Settings } from './options.ts';
import type { Recorder } from './recorder.ts';

/** Everything one run shares between the segment loop and the engine that integrates the segments. */
export class RunState {
  readonly net: Network;
  readonly modes: ModeControl;
  readonly bps: Breakpoints;
  /** The state vector at the current time. */
  readonly x: Float64Array;
  segments = 0;

  constructor(
    readonly model: CompiledModel,
    readonly built: BuiltRun,
    readonly s: Settings,
    readonly budget: Budget,
    readonly rec: Recorder,
  ) {
    this.net = built.net;
    this.modes = new ModeControl(this.net, (b) => this.blockId(b));
    this.bps = new Breakpoints(built.sources, built.delays, s.until, built.samplers);
    this.x = new Float64Array(this.net.nStates);
  }

  blockId(b: number): string {
    return b >= 0 ? this.model.blocks[b].id : '(none)';
  }
}

/** What an engine reports after integrating (part of) a segment. */
export interface SegmentOutcome {
  /** Time reached: the segment end, or where the run must restart. */
  end: number;
  /** The segment ended early at `end` (x holds the state there): a guard fired, or the engine restarts (guard −1). */
  restart: boolean;
  guard: number;
}

/** One way of moving the state through a segment with the modes frozen. */
export interface SegmentEngine {
  readonly name: 'exact' | 'odex';
  /** The latest end of a segment starting at t whose next breakpoint is tEnd (an engine may cut it shorter). */
  segmentEnd(t: number, tEnd: number): number;
  /**
   * Moves x from t towards tEnd: records the output grid in (t, tEnd) (and tEnd itself when it is
   * the end of the run), extends the dead-time histories, and stops at the first guard crossing.
   * `g0` holds the guard values at t. On return `net.sig` need not be current.
   */
  integrate(t: number, tEnd: number, g0: Float64Array): SegmentOutcome;
  /** Counters for the result's stats. */
  stats(): { steps: number; accepted: number; rejected: number; exact?: { modes: number; exponentials: number; jumps: number } };
  /** Exactly located turning points of recorded column `col` (time, value) beyond its samples: maxima (dir 1), minima (−1) or both (0). */
  extrema?(col: number, dir: number): { time: number; value: number }[];
  /** Largest |value| of signal `node` at its located turning points (actuator peak effort). */
  locatedPeak?(node: number): number;
}
