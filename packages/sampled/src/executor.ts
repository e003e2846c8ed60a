import { InputError } from '@loopwright/lti';
import type { DiscreteController, DiscreteLinear, DiscretePid, LinearCoefficients } from './controller.ts';
import type { PidCoefficients } from './pid.ts';

/**
 * The reference executor: the same difference equations, in the same order of operations, as
 * the generated C and Structured Text, so that a port can be checked sample by sample.
 *
 * PID (position form): D ← ad·D + bd·(e − e₋₁); the integral per method; v = kp·e + I + D;
 * u = clamp(v). Conditional integration drops this sample's integral increment when v is beyond a
 * limit and the increment pushes further out (then v is recomputed). Back-calculation adds
 * br·(u − v) to the integral after the output. Transfer-type controllers run the transposed
 * direct form: v = b0·e + w0; wᵢ ← b(i+1)·e − a(i+1)·f + w(i+1), f = u with limited feedback, v otherwise.
 */
export interface ControllerState {
  /** PID: the integral term I. */
  integral: number;
  /** PID: the filtered derivative term D. */
  derivative: number;
  /** Transfer-type: the transposed-direct-form states w0 … w(n−1). */
  w: number[];
  /** The previous input e(k−1). */
  lastError: number;
}

/** A fresh state whose output starts at `initialOutput` with zero error (bumpless start). */
export function createControllerState(c: DiscreteController, initialOutput = 0): ControllerState {
  const s: ControllerState = { integral: 0, derivative: 0, w: [], lastError: 0 };
  if (c.kind === 'pid') s.integral = initialOutput;
  else {
    const { a } = c.coefficients;
    const n = a.length - 1;
    s.w = new Array<number>(n).fill(0);
    // w1 … w(n−1) as for a held output u0 with e = 0 (wᵢ = −Σ_{j>i} a_j·u0); w0 = u0 so that v = u0
    // exactly (the held state itself for controllers with an integrator, where −Σ_{j≥1} a_j = 1).
    for (let i = n - 1; i >= 1; i--) s.w[i] = -a[i + 1] * initialOutput + (i + 1 < n ? s.w[i + 1] : 0);
    if (n > 0) s.w[0] = initialOutput;
  }
  return s;
}

/** One sample: input e(k), returns the limited output u(k) and updates the state. */
export function stepController(c: DiscreteController, s: ControllerState, e: number): number {
  return c.kind === 'pid' ? stepPid(c, c.coefficients, s, e) : stepLinear(c, c.coefficients, s, e);
}

function stepPid(c: DiscretePid, k: PidCoefficients, s: ControllerState, e: number): number {
  const p = k.kp * e;
  const d = k.ad * s.derivative + k.bd * (e - s.lastError);
  const inc = c.integral === 'tustin' ? 0.5 * k.bi * (e + s.lastError) : k.bi * e;
  const forward = c.integral === 'forward';
  let integ = s.integral + inc;
  let v = p + (forward ? s.integral : integ) + d;
  if (c.antiWindup === 'conditional' && ((v > k.umax && inc > 0) || (v < k.umin && inc < 0))) {
    integ = s.integral;
    v = p + integ + d;
  }
  const u = v > k.umax ? k.umax : v < k.umin ? k.umin : v;
  if (c.antiWindup === 'back-calculation') integ = integ + k.br * (u - v);
  s.integral = integ;
  s.derivative = d;
  s.lastError = e;
  return u;
}

function stepLinear(c: DiscreteLinear, k: LinearCoefficients, s: ControllerState, e: number): number {
  const n = k.a.length - 1;
  const v = k.b[0] * e + (n > 0 ? s.w[0] : 0);
  const u = v > k.umax ? k.umax : v < k.umin ? k.umin : v;
  const f = c.antiWindup === 'limited-feedback' ? u : v;
  for (let i = 0; i < n - 1; i++) s.w[i] = k.b[i + 1] * e - k.a[i + 1] * f + s.w[i + 1];
  if (n > 0) s.w[n - 1] = k.b[n] * e - k.a[n] * f;
  s.lastError = e;
  return u;
}

/**
 * Bumpless parameter change: installs `to` in place of `from` (same structure) and moves the
 * change of the direct term onto the state, so that for an unchanged error the output does not
 * jump (PID: I ← I + (kp_old − kp_new)·e₋₁, Åström & Hägglund 2006, ch. 13 (from memory);
 * transfer-type: w0 ← w0 + (b0_old − b0_new)·e₋₁). Returns the controller carrying `to`'s coefficients.
 */
export function retuneController<C extends DiscreteController>(from: C, to: C, s: ControllerState): C {
  assertSameStructure(from, to);
  if (from.kind === 'pid') {
    const a = from.coefficients as PidCoefficients;
    const b = to.coefficients as PidCoefficients;
    s.integral += (a.kp - b.kp) * s.lastError;
  } else {
    const a = from.coefficients as LinearCoefficients;
    const b = to.coefficients as LinearCoefficients;
    if (a.a.length > 1) s.w[0] += (a.b[0] - b.b[0]) * s.lastError;
  }
  return to;
}

/** Replaces a controller's coefficients (for retunes given as coefficients only, e.g. from a test vector). */
export function withCoefficients<C extends DiscreteController>(c: C, coefficients: C['coefficients']): C {
  const next = { ...c, coefficients } as C;
  assertSameStructure(c, next);
  return next;
}

export interface ControllerRun {
  outputs: number[];
}

/** Runs a controller over an input sequence, applying retunes (before the step at `atSample`). */
export function runController(
  c: DiscreteController,
  input: readonly number[],
  opts: { initialOutput?: number; retunes?: readonly { atSample: number; coefficients: DiscreteController['coefficients'] }[] } = {},
): number[] {
  const s = createControllerState(c, opts.initialOutput ?? 0);
  const retunes = [...(opts.retunes ?? [])].sort((x, y) => x.atSample - y.atSample);
  let cur = c;
  let r = 0;
  const out: number[] = [];
  for (let k = 0; k < input.length; k++) {
    while (r < retunes.length && retunes[r].atSample === k) {
      cur = retuneController(cur, withCoefficients(cur, retunes[r].coefficients), s);
      r++;
    }
    out.push(stepController(cur, s, input[k]));
  }
  return out;
}

function assertSameStructure(a: DiscreteController, b: DiscreteController): void {
  if (a.kind !== b.kind) throw new InputError(`retune: cannot change a ${a.kind} controller into a ${b.kind} one`);
  if (a.kind === 'pid' && b.kind === 'pid') {
    if (a.integral !== b.integral || a.antiWindup !== b.antiWindup)
      throw new InputError('retune: the integral method and anti-windup mode are fixed in the code; regenerate it to change them');
    const k = b.coefficients;
    for (const f of ['kp', 'bi', 'ad', 'bd', 'br'] as const) {
      if (!Number.isFinite(k[f])) throw new InputError(`retune: coefficient ${f} must be a finite number, got ${k[f]}`, { field: f });
    }
  } else if (a.kind === 'linear' && b.kind === 'linear') {
    if (a.coefficients.a.length !== b.coefficients.a.length || b.coefficients.b.length !== b.coefficients.a.length) {
      throw new InputError(
        `retune: the controller order is fixed in the code (${a.coefficients.a.length - 1}); regenerate it to change the order`,
      );
    }
    if (a.antiWindup !== b.antiWindup)
      throw new InputError('retune: the anti-windup mode is fixed in the code; regenerate it to change it');
    if (b.coefficients.a[0] !== 1) throw new InputError('retune: a[0] must be 1 (normalise the difference equation)', { field: 'a' });
  }
  if (!(b.coefficients.umin < b.coefficients.umax))
    throw new InputError('retune: the upper output limit must be above the lower one', { field: 'umax' });
}
