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
 * Exact step of a model's unit-gain dynamics over a length h with input v + slope·t, given the
 * coefficients c of that length (from `coefficients`). State (x1, x2): the lag (FOPDT), the two
 * lags in cascade (SOPDT, output x2), or the integral (IPDT). Written as plain functions over
 * numbers: this is the fit's inner loop.
 *  - lag: x(h) = x0·E + v·(1 − E) + slope·τ·(a − 1 + E), E = e^(−a), a = h/τ;
 *  - two lags: with the particular solutions x1p = v(t) − slope·τ1, x2p = v(t) − slope·(τ1 + τ2),
 *    e1(h) = e1(0)·E1, e2(h) = e2(0)·E2 + e1(0)·φ, φ = (e^(−h/τ1) − e^(−h/τ2))/(τ2(1/τ2 − 1/τ1)),
 *    written as (h/τ2)·e^(−h/max τ)·(1 − e^(−|Δ|h))/(|Δ|h), so equal lags need no special case;
 *  - integrator: x(h) = x0 + v·h + slope·h²/2.
 */
const IPDT = 0;
const FOPDT = 1;
const SOPDT = 2;

function coefficients(kind: number, tau1: number, tau2: number, h: number, c: Float64Array): void {
  if (kind === FOPDT) {
    const a = h / tau1;
    const oneMinusE = -Math.expm1(-a);
    c[0] = 1 - oneMinusE;
    c[1] = oneMinusE;
    c[2] = tau1 * expm1PlusX(a);
  } else if (kind === SOPDT) {
    const a = 1 / tau1;
    const b = 1 / tau2;
    c[0] = Math.exp(-a * h);
    c[1] = Math.exp(-b * h);
    c[2] = h * b * Math.exp(-Math.min(a, b) * h) * oneMinusExpOverX(Math.abs(b - a) * h);
  }
}

/**
 * The unit-gain response r(t − θ) of a model's dynamics (gain 1) to the sampled input, at the
 * given times (ascending; default: the input's own sample times). The model response is
 * gain·r: the fit uses r directly because the output is linear in the gain. The exponentials
 * depend on the step length only and are kept for the last full step and the last partial
 * step (the fraction of a sample the dead time leaves): with a uniform sample time they are
 * computed once per call.
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
  const K = kind === 'ipdt' ? IPDT : kind === 'fopdt' ? FOPDT : SOPDT;
  const tau1 = timeConstants[0] ?? 0;
  const tau2 = timeConstants[1] ?? 0;
  const out = new Float64Array(at.length);
  const linear = input.between === 'linear';
  const full = new Float64Array(3);
  const part = new Float64Array(3);
  let hFull = NaN;
  let hPart = NaN;
  let x1 = 0;
  let x2 = 0;
  let k = 0; // (x1, x2) is the state at t[k]
  for (let i = 0; i < at.length; i++) {
    const s = at[i] - deadTime;
    if (!(s >= t[0])) {
      out[i] = 0;
      continue;
    }
    while (k + 1 < n && t[k + 1] <= s) {
      const h = t[k + 1] - t[k];
      if (h !== hFull) {
        hFull = h;
        coefficients(K, tau1, tau2, h, full);
      }
      const v = u[k];
      const slope = linear ? (u[k + 1] - v) / h : 0;
      if (K === FOPDT) x1 = x1 * full[0] + v * full[1] + slope * full[2];
      else if (K === SOPDT) {
        const p1 = v - slope * tau1;
        const p2 = p1 - slope * tau2;
        const e1 = x1 - p1;
        const rise = slope * h;
        x2 = p2 + rise + (x2 - p2) * full[1] + e1 * full[2];
        x1 = p1 + rise + e1 * full[0];
      } else x1 += (v + 0.5 * slope * h) * h;
      k++;
    }
    const h = s - t[k];
    if (h === 0) {
      out[i] = K === SOPDT ? x2 : x1;
      continue;
    }
    if (h !== hPart) {
      hPart = h;
      coefficients(K, tau1, tau2, h, part);
    }
    const v = u[k];
    const slope = linear && k + 1 < n ? (u[k + 1] - v) / (t[k + 1] - t[k]) : 0;
    if (K === FOPDT) out[i] = x1 * part[0] + v * part[1] + slope * part[2];
    else if (K === SOPDT) {
      const p1 = v - slope * tau1;
      const p2 = p1 - slope * tau2;
      out[i] = p2 + slope * h + (x2 - p2) * part[1] + (x1 - p1) * part[2];
    } else out[i] = x1 + (v + 0.5 * slope * h) * h;
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
    throw new InputError(`input: ${time.length} times and ${value.length} values; they must be equal in number and not empty`, {
      field: 'input',
    });
  }
  if (!INPUT_INTERPOLATIONS.includes(input.between)) {
    throw new InputError(`input between samples: '${String(input.between)}' is not one of ${INPUT_INTERPOLATIONS.join(', ')}`, {
      field: 'between',
    });
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
