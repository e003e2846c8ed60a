/** Options and results of a time simulation (see simulate.ts). */
import type { MetricsOptions, ResponseMetrics } from '@loopwright/lti';

export interface SimulateOptions {
  /** End time in seconds (> 0). */
  until: number;
  /** Values of named parameters that replace the diagram's (a sweep value, a CLI --set). */
  overrides?: Record<string, number>;
  /** Relative / absolute tolerance of the integrator (defaults 1e-6 and 1e-9). */
  rtol?: number;
  atol?: number;
  /** Spacing of the uniform output grid in seconds (default until/1000). */
  outputStep?: number;
  /** Replace every nonlinearity by its linear form (saturation, rate limit and dead zone pass the signal, PID limits off). */
  linear?: boolean;
  /** Wires to record as traces "wire:<id>" besides the probes: a list of wire ids, or 'all'. */
  wires?: string[] | 'all';
  /** Step budget: accepted plus rejected integrator steps over the whole run (default 200 000). */
  maxSteps?: number;
  /** Wall-time budget in milliseconds (default 10 000). */
  maxWallMs?: number;
  /** A state or signal beyond ±divergenceBound ends the run as diverged (default 1e9). */
  divergenceBound?: number;
  /** Probe whose response metrics to compute (default: every probe). */
  metricsFor?: string[];
  /** Passed to lti responseMetrics (settling band, reference, …). */
  metricsOptions?: MetricsOptions;
  /**
   * Which engine moves the state: 'exact' (piecewise-affine stepping by matrix exponentials),
   * 'odex' (extrapolation integrator), or 'auto' (default: exact whenever it applies, see the README).
   */
  engine?: 'auto' | 'exact' | 'odex';
  /** Called with the fraction of simulated time done (0..1), at most about every 1 %. */
  onProgress?: (fraction: number) => void;
  /** Polled during the run; returning true ends it with status 'cancelled' and the partial traces. */
  isCancelled?: () => boolean;
}

export type SimStatus = 'ok' | 'diverged' | 'stiff' | 'budget' | 'cancelled';

export interface SimEvent {
  time: number;
  /** e.g. 'limit-upper', 'limit-lower', 'limit-leave', 'dead-zone-enter', 'dead-zone-leave',
   * 'rate-rising', 'rate-falling', 'rate-leave', 'integration-hold', 'integration-resume', 'source' */
  kind: string;
  block: string;
}

/** Actuator figures of one limiting block (saturation, PID with output limits, rate limit). */
export interface ActuatorFigures {
  /** Total time the block spent at a limit (exact from the event times), s. */
  timeInSaturation: number;
  /** Largest |output| seen (grid, events and step ends). */
  peakEffort: number;
  /** Number of times a limit was reached. */
  limitHits: number;
}

export interface SimStats {
  /** Steps of the engine (exact: exact steps; odex: integrator steps, rejected ones included). */
  steps: number;
  accepted: number;
  rejected: number;
  evaluations: number;
  segments: number;
  wallMs: number;
  /** Exact engine only: distinct mode combinations met, matrix exponentials computed, quiescence jumps taken. */
  exact?: { modes: number; exponentials: number; jumps: number };
}

export interface SimResult {
  /** Uniform output grid plus the exact event and breakpoint times, increasing. */
  time: number[];
  /** Keyed by probe block id, and "wire:<id>" for requested wires. */
  traces: Record<string, number[]>;
  events: SimEvent[];
  status: SimStatus;
  /** "completed at t = 10 s" or the cause and the time reached. */
  message: string;
  /** Simulated time reached (= until when status is 'ok'). */
  timeReached: number;
  /**
   * Response metrics per probe (lti responseMetrics), computed from the traces: peaks from the
   * samples and the exactly located turning points (never interpolated across an event or a
   * breakpoint); figures relative to the final value are null, with a reason, when the run did
   * not complete or the final value hardly differs from the initial one.
   */
  metrics: Record<string, ResponseMetrics | null>;
  /** The engine that moved the state. */
  engine: 'exact' | 'odex';
  /** Per limiting block id. */
  actuators: Record<string, ActuatorFigures>;
  stats: SimStats;
}
