import { type LinearForm, type ResolvedParams, samplingOf } from '@loopwright/graph';
import { InputError } from '@loopwright/lti';
import {
  type ControllerState,
  type DiscreteController,
  controllerSpecOf,
  createControllerState,
  discretizeController,
  stepController,
} from '@loopwright/sampled';
import { defineOp, type SimNode } from './node.ts';
import type { Builder } from './registry-types.ts';

/**
 * A sampled controller block (a PID, lead–lag, transfer-function or gain block with a sample
 * time): it reads its input at its own instants k·T, runs one step of its difference equation
 * (`stepController` of @loopwright/sampled — the same code the export's test vector comes from,
 * with its limits and anti-windup) and applies the result D·T later (computation delay D
 * samples), holding its output in between (zero-order hold). Its output is constant inside
 * every segment: no states, no direct feedthrough (it breaks algebraic loops), and in the exact
 * engine a one-entry constant exosystem.
 */
export class Sampler {
  readonly T: number;
  readonly D: number;
  private readonly state: ControllerState;
  /** Index of the next sample instant k·T. */
  private k = 0;
  /** Outputs computed, waiting for their application time (increasing). */
  private readonly pending: { time: number; value: number }[] = [];

  constructor(
    readonly controller: DiscreteController,
    private readonly blockId = 'sampled block',
  ) {
    this.T = controller.sampleTime;
    this.D = controller.computeDelay;
    this.state = createControllerState(controller, 0);
  }

  /** The first instant (sample or application) after t. */
  nextAfter(t: number): number {
    let j = Math.max(this.k, Math.floor(t / this.T));
    // Past 2^52 samples the index no longer counts one by one: the instants cannot be told apart.
    if (!(j < 2 ** 52)) throw this.tooFine(t);
    while (!(j * this.T > t)) if (++j >= 2 ** 52) throw this.tooFine(t);
    let next = j * this.T;
    for (const p of this.pending) {
      if (p.time > t) {
        if (p.time < next) next = p.time;
        break;
      }
    }
    return next;
  }

  private tooFine(t: number): InputError {
    return new InputError(`block ${this.blockId}: sample time ${this.T} s is too small to step to t = ${t} s (more than 2^52 samples)`, {
      field: `blocks.${this.blockId}.params.sampleTime`,
    });
  }

  /** Applies every output due at t (within tol); returns the held value to use, or NaN when none changed. */
  apply(t: number, tol: number): number {
    let v = NaN;
    while (this.pending.length && this.pending[0].time <= t + tol) v = this.pending.shift()!.value;
    return v;
  }

  /** Whether t is a sample instant (within tol); on true the instant is consumed. */
  due(t: number, tol: number): boolean {
    // Jump to the first instant not before t - tol (arithmetic, not a count: a tiny T would
    // otherwise take one iteration per skipped sample).
    if (this.k * this.T < t - tol) this.k = Math.max(this.k + 1, Math.ceil((t - tol) / this.T));
    while (this.k * this.T < t - tol) this.k++;
    if (Math.abs(this.k * this.T - t) > tol) return false;
    this.k++;
    return true;
  }

  /** One step on the sampled input e; the output is due at t + D·T (returned when D = 0). */
  step(k: number, e: number): number {
    const u = stepController(this.controller, this.state, e);
    if (this.D === 0) return u;
    this.pending.push({ time: (k + this.D) * this.T, value: u });
    return NaN;
  }

  /** The index of the instant consumed last. */
  get last(): number {
    return this.k - 1;
  }
}

export const sampledOp = defineOp({
  name: 'sampled',
  output: (nd) => nd.v,
  exoSize: () => 1,
  exoState: (nd, _when, z, at) => {
    z[at] = nd.v;
  },
});

/**
 * Wraps the builder of a controller kind: a block with a sample time becomes a sampled node,
 * one without stays what `continuous` makes. In a linear run the output limits are dropped
 * (as the continuous PID's are).
 */
export function sampledOr(continuous: Builder): Builder {
  return (cb, p, ctx) => {
    const sampling = samplingOf(cb.kind, p as ResolvedParams);
    if (!sampling) return continuous(cb, p, ctx);
    const lf = ctx.checkLinearForm() as LinearForm;
    if (lf.type !== 'transfer') throw new InputError(`block ${cb.id}: no transfer function to sample`, { field: `blocks.${cb.id}` });
    const params = ctx.linear ? { ...p, umin: -Infinity, umax: Infinity } : p;
    let controller: DiscreteController;
    try {
      controller = discretizeController(controllerSpecOf(cb.kind, params, lf.tf), sampling);
    } catch (err) {
      if (err instanceof InputError)
        throw new InputError(`block ${cb.id} sampled form: ${err.message}`, {
          field: `blocks.${cb.id}.params.${err.details.field ?? 'sampleTime'}`,
        });
      throw err;
    }
    const nd: SimNode = ctx.add(sampledOp, cb);
    ctx.wire(nd, cb.inputs);
    nd.smp = new Sampler(controller, cb.id);
    ctx.sampler(nd);
  };
}

/**
 * The sampled nodes' work at time t: first every output due is applied, then every node whose
 * sample instant t is reads its input from the signals as they are now (all sampled at once),
 * steps, and applies a result without computation delay at once. `evaluate` recomputes the
 * signals; returns whether any held output changed and whether an output was scheduled for later.
 */
export function sampleInstant(
  samplers: readonly SimNode[],
  t: number,
  sig: Float64Array,
  evaluate: () => void,
): { changed: boolean; scheduled: boolean } {
  const tol = 1e-12 * Math.max(1, Math.abs(t));
  let changed = false;
  for (const nd of samplers) {
    const v = nd.smp!.apply(t, tol);
    if (!Number.isNaN(v) && v !== nd.v) {
      nd.v = v;
      changed = true;
    }
  }
  const due = samplers.filter((nd) => nd.smp!.due(t, tol));
  if (due.length === 0) return { changed, scheduled: false };
  let scheduled = false;
  if (changed) evaluate();
  const inputs = due.map((nd) => sig[nd.in0]);
  due.forEach((nd, i) => {
    const u = nd.smp!.step(nd.smp!.last, inputs[i]);
    if (Number.isNaN(u)) scheduled = true;
    else if (u !== nd.v) {
      nd.v = u;
      changed = true;
    }
  });
  return { changed, scheduled };
}
