import type { SignalHistory } from '../history.ts';
import type { SourceParams } from './source-wave.ts';
import type { Sampler } from './sampled.ts';

/**
 * The run-time form of one signal of a diagram. A block becomes one node (or two: a transfer
 * function with a dead time is a delay node feeding a linear node). Every node has the same
 * fields whatever its operation, so the hot loops see one object shape; the operation's
 * behaviour lives in its module under ops/ (see `Op`).
 */
export class SimNode {
  op: Op;
  /** Index of the diagram block this node belongs to (for messages and figures); −1 for none. */
  block = -1;
  /** This node's own index (its signal). */
  self = -1;
  /** Signal feeding the (first) input; a summing junction uses `ins`/`signs`. */
  in0 = -1;
  ins: Int32Array = new Int32Array(0);
  signs: Float64Array = new Float64Array(0);
  /** The output depends on the input at the same instant (topological order, algebraic loops). */
  feedthrough = false;
  // states: offset in the state vector and count
  so = 0;
  ns = 0;
  // linear block in controllable canonical form: ẋ_j = x_(j+1), ẋ_(n−1) = b·u − Σ a_j x_j, y = Σ c_j x_j + d·u
  a: Float64Array = new Float64Array(0);
  c: Float64Array = new Float64Array(0);
  d = 0;
  /** Input gain of the last canonical state (scales the states to the output's size). */
  b = 1;
  // limits (saturation, dead zone, PID output) and rates
  lo = -Infinity;
  hi = Infinity;
  rising = Infinity;
  falling = Infinity;
  /** Current mode (−1 / 0 / +1: below, inside, above; a rate limiter: falling, tracking, rising). */
  mode = 0;
  /** Conditional integration: the integral is held. */
  frozen = false;
  /** First guard index and guard count. */
  go = 0;
  ng = 0;
  // PID: v = kp·e + I + kdTf·(e − z); İ = ki·e (+ anti-windup); ż = (e − z)/tf
  kp = 0;
  ki = 0;
  kdTf = 0;
  tf = 1;
  tt = 1;
  aw = 0;
  hasD = false;
  /** PID: the unlimited output at the last evaluation. */
  v = 0;
  // source, dead time
  src: SourceParams | null = null;
  delay = 0;
  hist: SignalHistory | null = null;
  /** A sampled controller's instants, state and pending outputs (its held output is `v`). */
  smp: Sampler | null = null;
  /** Slot of an exogenous signal (a source or a dead time's output) in the exact engine; −1 for none. */
  exo = -1;

  constructor(op: Op) {
    this.op = op;
  }
}

/** Chooses and records modes at a restart (modes.ts implements it). */
export interface ModeSink {
  /** A rate limiter keeps its slewing mode during a dwell (repeated switches at one instant). */
  readonly inDwell: boolean;
}

/**
 * The behaviour of one operation, in one module per operation (ops/<name>.ts). Every Op object
 * is made by `defineOp`, so all have the same shape and the network's call sites stay fast.
 * Adding a block kind: a linear kind needs nothing here (its catalogue linear form is realised
 * by ops/linear.ts); a nonlinear kind adds one module with its Op and a builder, and one line in
 * ops/registry.ts.
 */
export interface Op {
  readonly name: string;
  /** The node's output from its inputs' signals `sig` and its own states `x`, in its current mode. */
  output(nd: SimNode, t: number, x: ArrayLike<number>, sig: Float64Array, piece: number): number;
  /** State derivatives into dx[nd.so …]; called only for nodes with states. */
  derivative(nd: SimNode, x: ArrayLike<number>, sig: Float64Array, dx: { [i: number]: number }): void;
  /**
   * Guard values into g[nd.go …] (a guard turning negative ends the mode) and the size of the
   * signal behind each into scale (round-off allowance). `udot` holds input slopes where
   * `needsSlope` asked for them. An inactive guard is +Infinity.
   */
  guards(nd: SimNode, x: ArrayLike<number>, sig: Float64Array, udot: Float64Array, g: Float64Array, scale: Float64Array): void;
  /** The guards may read the slope of the input in some mode (rate limiter). */
  readonly readsSlope: boolean;
  /** The guards in the current mode read the slope of the input (rate limiter while tracking). */
  needsSlope(nd: SimNode): boolean;
  /**
   * At a restart: the mode this node should take from the signals (evaluated in the current
   * modes); may set `nd.mode`/`nd.frozen` and the node's state in `x`. Returns true on a change.
   */
  choose(nd: SimNode, x: Float64Array, sig: Float64Array, udot: Float64Array, modes: ModeSink): boolean;
  /** The guard `slot` (0-based within the node) crossed zero: the new mode (and state). */
  fire(nd: SimNode, slot: number, x: Float64Array, sig: Float64Array, modes: ModeSink): { mode: number; frozen: boolean };
  /** At a segment start: a jump of the input that the mode cannot follow (rate limiter). */
  jump(nd: SimNode, x: Float64Array, sig: Float64Array): number;
  /** After a restart: states that follow a signal while not integrated (rate limiter tracking). */
  sync(nd: SimNode, x: Float64Array, sig: Float64Array): void;
  /** Event name for entering `mode`. */
  eventKind(nd: SimNode, mode: number): string;
  /** Reports actuator figures (time at a limit, peak effort, limit hits). */
  readonly actuator: boolean;
  /**
   * Within each mode the output and state derivatives are affine in the states and inputs (true
   * for every operation of the catalogue): the exact engine applies. An operation that is not
   * (a smooth nonlinearity) sets false, and such diagrams run on odex.
   */
  readonly affine: boolean;
  /** Exact engine: size of the exosystem block that generates this node's output (0: none). */
  exoSize(nd: SimNode): number;
  /**
   * Exact engine: writes the exosystem's generator rows into M (row-major, stride `N`) at block
   * offset `at`; `one` is the index of the constant state.
   */
  exoGenerator(nd: SimNode, M: Float64Array, N: number, at: number, one: number): void;
  /**
   * Exact engine: the exosystem state at the start t of a step of length h (inside the segment
   * containing `piece`) into z[at …]; the node's output is its first entry. `when` is
   * [t, h, piece] (numbers in an array: this is called at every step, and V8 boxes doubles
   * passed as arguments to a call it does not inline).
   */
  exoState(nd: SimNode, when: Float64Array, z: Float64Array, at: number): void;
  /** Exact engine: the output stays constant from t up to the next breakpoint (quiescence). */
  steady(nd: SimNode, t: number, piece: number): boolean;
}

type OpParts = Pick<Op, 'name' | 'output'> & Partial<Omit<Op, 'name' | 'output'>>;

const none = () => {};
const noSlope = () => false;
const unchanged = () => false;
const noExo = () => 0;

/** An Op with every member present (defaults: no states, no guards, no exosystem, always steady). */
export function defineOp(parts: OpParts): Op {
  return {
    name: parts.name,
    output: parts.output,
    derivative: parts.derivative ?? none,
    guards: parts.guards ?? none,
    readsSlope: parts.readsSlope ?? false,
    needsSlope: parts.needsSlope ?? noSlope,
    choose: parts.choose ?? unchanged,
    fire: parts.fire ?? ((nd) => ({ mode: nd.mode, frozen: nd.frozen })),
    jump: parts.jump ?? ((nd) => nd.mode),
    sync: parts.sync ?? none,
    eventKind: parts.eventKind ?? (() => 'mode'),
    actuator: parts.actuator ?? false,
    affine: parts.affine ?? true,
    exoSize: parts.exoSize ?? noExo,
    exoGenerator: parts.exoGenerator ?? none,
    exoState: parts.exoState ?? none,
    steady: parts.steady ?? (() => true),
  };
}
