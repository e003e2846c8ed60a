import { InputError } from '@loopwright/lti';
import type { ProcessModel } from './process-model.ts';

/**
 * Exact responses of the process models to a sampled input.
 *
 * Between samples the input is taken as
 *  - 'linear': a straight line from one sample to the next (a continuous signal, sampled), or
 *  - 'hold':   held at the sample's value until the next sample (a digital controller's output
 *              logged at its update instants; a step at a sample instant is then exact).
 * Before the first sample the process rests at the initial steady state (zero deviation); at
 * time[0] the input jumps to value[0]; after the last sample it stays at the last value.
 *
 * Each lag is advanced over every input interval by its exact solution for a constant or
 * linear input (no integration error), so the response is exact for the stated interpolation
 * at any time, not only at the samples. The dead time shifts the evaluation times by θ, which
 * is why the response is a continuous function of θ (not rounded to whole samples); with
 * 'linear' it is also continuously differentiable in θ, with 'hold' its θ-derivative jumps only
 * where a shifted time passes an input change.
 */
export type InputInterpolation = 'linear' | 'hold';
export const INPUT_INTERPOLATIONS: readonly InputInterpolation[] = ['linear', 'hold'];

export interface SampledInput {
  /** Strictly increasing times (s). */
  readonly time: ArrayLike<number>;
  /** Input deviations from the initial steady state at those times. */
  readonly value: ArrayLike<number>;
  readonly between: InputInterpolation;
}

/** e^(−a) − 1 + a without cancellation for small a (= a²/2 − a³/6 + …). */
function expm1PlusX(a: number): number {
  if (Math.abs(a) < 1e-3) return a * a * (0.5 - a * (1 / 6 - a * (1 / 24 - a / 120)));
  return Math.expm1(-a) + a;
}

/** (1 − e^(−x))/x with its limit 1 at x = 0. */
function oneMinusExpOverX(x: number): number {
  if (Math.abs(x) < 1e-8) return 1 - x / 2;
  return -Math.expm1(-x) / x;
}

/**
 * One model's unit-gain dynamics, advanced exactly over an interval of length h with input
 * v + slope·t. The state is at most two numbers; `out` reads the undelayed output. The
 * exponentials depend on h only, so they are kept for the last two lengths used: with a
 * uniform sample time every full step and every partial step (the fraction of a sample that
 * the dead time leaves) reuses them.
 */
interface Dynamics {
  readonly size: number;
  advance(x: Float64Array, v: number, slope: number, h: number): void;
  out(x: Float64Array): number;
}

/** A two-entry cache of per-length coefficients. */
function cached(make: (h: number, c: Float64Array) => void, size: number) {
  const keys = [NaN, NaN];
  const vals = [new Float64Array(size), new Float64Array(size)];
  let next = 0;
  return (h: number): Float64Array => {
    if (keys[0] === h) return vals[0];
    if (keys[1] === h) return vals[1];
    const slot = next;
    next = 1 - next;
    keys[slot] = h;
    make(h, vals[slot]);
    return vals[slot];
  };
}

function lag(tau: number): Dynamics {
  // x(h) = x0·E + v·(1 − E) + slope·τ·(a − 1 + E), E = e^(−a), a = h/τ.
  const coef = cached((h, c) => {
    const a = h / tau;
    const oneMinusE = -Math.expm1(-a);
    c[0] = 1 - oneMinusE;
    c[1] = oneMinusE;
    c[2] = tau * expm1PlusX(a);
  }, 3);
  return {
    size: 1,
    advance(x, v, slope, h) {
      const c = coef(h);
      x[0] = x[0] * c[0] + v * c[1] + slope * c[2];
    },
    out: (x) => x[0],
  };
}

function twoLags(tau1: number, tau2: number): Dynamics {
  // Errors from the particular solutions x1p = v(t) − slope·τ1, x2p = v(t) − slope·(τ1 + τ2):
  // e1(h) = e1(0)·E1, e2(h) = e2(0)·E2 + e1(0)·φ, φ = (e^(−h/τ1) − e^(−h/τ2))/(τ2·(1/τ2 − 1/τ1)),
  // written as (h/τ2)·e^(−h/max τ)·(1 − e^(−|Δ|h))/(|Δ|h) so equal lags need no special case.
  const a = 1 / tau1;
  const b = 1 / tau2;
  const coef = cached((h, c) => {
    c[0] = Math.exp(-a * h);
    c[1] = Math.exp(-b * h);
    c[2] = h * b * Math.exp(-Math.min(a, b) * h) * oneMinusExpOverX(Math.abs(b - a) * h);
  }, 3);
  return {
    size: 2,
    advance(x, v, slope, h) {
      const c = coef(h);
      const p1 = v - slope * tau1;
      const p2 = v - slope * (tau1 + tau2);
      const e1 = x[0] - p1;
      const e2 = x[1] - p2;
      const rise = slope * h;
      x[0] = p1 + rise + e1 * c[0];
      x[1] = p2 + rise + e2 * c[1] + e1 * c[2];
    },
    out: (x) => x[1],
  };
}

const integrator: Dynamics = {
  size: 1,
  advance(x, v, slope, h) {
    x[0] += v * h + 0.5 * slope * h * h;
  },
  out: (x) => x[0],
};

function dynamicsOf(kind: ProcessModel['kind'], lags: readonly number[]): Dynamics {
  if (kind === 'ipdt') return integrator;
  if (kind === 'fopdt') return lag(lags[0]);
  return twoLags(lags[0], lags[1]);
}

/**
 * The unit-gain response r(t − θ) of a model's dynamics (gain 1) to the sampled input, at the
 * given times (ascending; default: the input's own sample times). The model response is
 * gain·r: the fit uses r directly because the output is linear in the gain.
 */
export function unitResponse(
  kind: ProcessModel['kind'],
  timeConstants: readonly number[],
  deadTime: number,
  input: SampledInput,
  at: ArrayLike<number> = input.time,
): Float64Array {
  const t = input.time;
  const u = input.value;
  const n = t.length;
  const dyn = dynamicsOf(kind, timeConstants);
  const x = new Float64Array(dyn.size);
  const tmp = new Float64Array(dyn.size);
  const out = new Float64Array(at.length);
  const linear = input.between === 'linear';
  const slopeAt = (k: number) => (linear && k + 1 < n ? (u[k + 1] - u[k]) / (t[k + 1] - t[k]) : 0);
  let k = 0; // x is the state at t[k]
  for (let i = 0; i < at.length; i++) {
    const tau = at[i] - deadTime;
    if (!(tau >= t[0])) {
      out[i] = 0;
      continue;
    }
    while (k + 1 < n && t[k + 1] <= tau) {
      dyn.advance(x, u[k], slopeAt(k), t[k + 1] - t[k]);
      k++;
    }
    const h = tau - t[k];
    if (h === 0) {
      out[i] = dyn.out(x);
    } else {
      tmp.set(x);
      dyn.advance(tmp, u[k], slopeAt(k), h);
      out[i] = dyn.out(tmp);
    }
  }
  return out;
}

/** The model's response (deviations) to the sampled input at the given times. */
export function modelResponse(m: ProcessModel, input: SampledInput, at: ArrayLike<number> = input.time): number[] {
  checkInput(input);
  const r = unitResponse(m.kind, m.timeConstants, m.deadTime, input, at);
  return Array.from(r, (v) => m.gain * v);
}

/** The model's unit-step response at the given times (step at t = 0, rest before). */
export function modelStepResponse(m: ProcessModel, at: readonly number[]): number[] {
  const step: SampledInput = { time: [0], value: [1], between: 'hold' };
  const order = at.map((_, i) => i).sort((a, b) => at[a] - at[b]);
  const sorted = order.map((i) => at[i]);
  const r = unitResponse(m.kind, m.timeConstants, m.deadTime, step, sorted);
  const out = new Array<number>(at.length);
  order.forEach((i, j) => (out[i] = m.gain * r[j]));
  return out;
}

/** Throws InputError unless the sampled input has finite values and strictly increasing times. */
export function checkInput(input: SampledInput): void {
  const { time, value } = input;
  if (time.length === 0 || time.length !== value.length) {
    throw new InputError(`input: ${time.length} times and ${value.length} values; they must be equal in number and not empty`, { field: 'input' });
  }
  if (!INPUT_INTERPOLATIONS.includes(input.between)) {
    throw new InputError(`input between samples: '${String(input.between)}' is not one of ${INPUT_INTERPOLATIONS.join(', ')}`, { field: 'between' });
  }
  for (let i = 0; i < time.length; i++) {
    if (!Number.isFinite(time[i]) || !Number.isFinite(value[i])) {
      throw new InputError(`input: sample ${i + 1} is not finite (time ${time[i]}, value ${value[i]})`, { field: 'input' });
    }
    if (i > 0 && !(time[i] > time[i - 1])) {
      throw new InputError(`input: time ${time[i]} at sample ${i + 1} is not after ${time[i - 1]}`, { field: 'time' });
    }
  }
}
