import { InputError, type TransferFunction, poly as P, tfFromCoefficients } from '@loopwright/lti';
import {
  type DifferenceEquation,
  type DiscreteTransferFunction,
  checkSampleTime,
  differenceEquation,
  fromDifferenceEquation,
} from './discrete.ts';
import { checkComputeDelay, holdEquivalent } from './hold.ts';
import {
  type DerivativeMethod,
  type IntegralMethod,
  type PidAntiWindup,
  type PidCoefficients,
  type PidSettings,
  DERIVATIVE_METHODS,
  INTEGRAL_METHODS,
  PID_ANTI_WINDUP,
  outputLimits,
  pidCoefficients,
  pidGains,
  pidTransfer,
} from './pid.ts';
import { matchedPoleZero, tustin } from './tustin.ts';

/** Discretisation of a transfer-type controller (lead–lag, transfer function, gain). */
export const DISCRETISATION_METHODS = ['zoh', 'tustin', 'matched'] as const;
export type DiscretisationMethod = (typeof DISCRETISATION_METHODS)[number];

/**
 * Anti-windup of a transfer-type controller with output limits: 'limited-feedback' runs the
 * recursion on the limited output u (not the unlimited v), which for a controller with an
 * integrator stops the integration at the limit. It is the general anti-windup form with the
 * observer polynomial z^n (Åström & Wittenmark, Computer-Controlled Systems, 3rd ed., ch. 9
 * (from memory)); without limits it changes nothing.
 */
export const LINEAR_ANTI_WINDUP = ['off', 'limited-feedback'] as const;
export type LinearAntiWindup = (typeof LINEAR_ANTI_WINDUP)[number];

/** Output limits shared by every controller kind (absent or ±Infinity = none). */
interface Limits {
  umin?: number;
  umax?: number;
}

/** A controller as the blocks describe it (field names as in the block catalogue). */
export type ControllerSpec =
  | ({ kind: 'pid' } & PidSettings)
  | ({ kind: 'lead-lag'; k: number; tLead: number; tLag: number; antiWindup?: LinearAntiWindup } & Limits)
  | ({ kind: 'gain'; k: number } & Limits)
  | ({ kind: 'transfer-function'; tf: TransferFunction; antiWindup?: LinearAntiWindup } & Limits);

/** How a controller is sampled. */
export interface SamplingSettings {
  /** Sample time T (s). */
  sampleTime: number;
  /** Computation delay in samples: 0 none, 1 one sample, or a fraction (default 0). */
  computeDelay?: number;
  /** Transfer-type controllers: 'zoh', 'tustin' (default) or 'matched'. */
  method?: DiscretisationMethod;
  /** Tustin: prewarping frequency (rad/s). */
  prewarp?: number;
  /** PID: integral approximation (default 'backward'). */
  integral?: IntegralMethod;
  /** PID: derivative filter discretisation (default 'backward'). */
  derivative?: DerivativeMethod;
}

/** Coefficients of a transfer-type controller: the difference equation in z^(−1) (a[0] = 1) and the limits. */
export interface LinearCoefficients extends DifferenceEquation {
  umin: number;
  umax: number;
}

interface DiscreteCommon {
  sampleTime: number;
  /** Computation delay in samples: the output is applied this long after sampling (the code does not add it). */
  computeDelay: number;
  /** The block kind it came from. */
  source: ControllerSpec['kind'];
  /** The linear controller C(z) (limits ignored). */
  transfer: DiscreteTransferFunction;
  /** The combined linear difference equation of C(z): u(k) = Σ b[i]·e(k−i) − Σ a[i]·u(k−i), a[0] = 1. */
  differenceEquation: DifferenceEquation;
}

export interface DiscretePid extends DiscreteCommon {
  kind: 'pid';
  integral: IntegralMethod;
  derivative: DerivativeMethod;
  /** Effective anti-windup: 'off' where there are no limits or no integral action. */
  antiWindup: PidAntiWindup;
  coefficients: PidCoefficients;
}

export interface DiscreteLinear extends DiscreteCommon {
  kind: 'linear';
  method: DiscretisationMethod;
  antiWindup: LinearAntiWindup;
  coefficients: LinearCoefficients;
}

export type DiscreteController = DiscretePid | DiscreteLinear;

/** The sampled form of a controller: coefficients, difference equation and C(z). */
export function discretizeController(spec: ControllerSpec, sampling: SamplingSettings): DiscreteController {
  const T = checkSampleTime(sampling.sampleTime);
  const computeDelay = checkComputeDelay(sampling.computeDelay);
  if (spec.kind === 'pid') {
    const integral = choice(sampling.integral ?? 'backward', INTEGRAL_METHODS, 'integral');
    const derivative = choice(sampling.derivative ?? 'backward', DERIVATIVE_METHODS, 'derivative');
    const aw = choice(spec.antiWindup ?? 'back-calculation', PID_ANTI_WINDUP, 'antiWindup');
    const coefficients = pidCoefficients(spec, T, { integral, derivative });
    const limited = Number.isFinite(coefficients.umin) || Number.isFinite(coefficients.umax);
    const transfer = pidTransfer(coefficients, T, integral);
    return {
      kind: 'pid',
      source: 'pid',
      sampleTime: T,
      computeDelay,
      integral,
      derivative,
      antiWindup: limited && pidGains(spec).ki !== 0 ? aw : 'off',
      coefficients,
      transfer,
      differenceEquation: differenceEquation(transfer),
    };
  }
  const method = choice(sampling.method ?? 'tustin', DISCRETISATION_METHODS, 'method');
  const tf = continuousForm(spec);
  const transfer =
    method === 'zoh' ? holdEquivalent(tf, T) : method === 'matched' ? matchedPoleZero(tf, T) : tustin(tf, T, { prewarp: sampling.prewarp });
  const eq = differenceEquation(transfer);
  const { umin, umax } = outputLimits(spec.umin, spec.umax);
  const aw = spec.kind === 'gain' ? 'off' : choice(spec.antiWindup ?? 'limited-feedback', LINEAR_ANTI_WINDUP, 'antiWindup');
  return {
    kind: 'linear',
    source: spec.kind,
    sampleTime: T,
    computeDelay,
    method,
    antiWindup: Number.isFinite(umin) || Number.isFinite(umax) ? aw : 'off',
    coefficients: { b: eq.b, a: eq.a, umin, umax },
    transfer,
    differenceEquation: eq,
  };
}

/** A transfer-type controller from its own difference equation (e.g. designed directly in z). */
export function linearController(
  eq: DifferenceEquation,
  sampleTime: number,
  opts: Limits & { computeDelay?: number; antiWindup?: LinearAntiWindup } = {},
): DiscreteLinear {
  const transfer = fromDifferenceEquation(eq, sampleTime);
  const norm = differenceEquation(transfer);
  const { umin, umax } = outputLimits(opts.umin, opts.umax);
  const aw = choice(opts.antiWindup ?? 'limited-feedback', LINEAR_ANTI_WINDUP, 'antiWindup');
  return {
    kind: 'linear',
    source: 'transfer-function',
    sampleTime,
    computeDelay: checkComputeDelay(opts.computeDelay),
    method: 'tustin',
    antiWindup: Number.isFinite(umin) || Number.isFinite(umax) ? aw : 'off',
    coefficients: { b: norm.b, a: norm.a, umin, umax },
    transfer,
    differenceEquation: norm,
  };
}

/** The continuous transfer function of a transfer-type controller spec. */
function continuousForm(spec: Exclude<ControllerSpec, { kind: 'pid' }>): TransferFunction {
  switch (spec.kind) {
    case 'gain':
      return tfFromCoefficients([finite(spec.k, 'k')], [1]);
    case 'lead-lag': {
      const k = finite(spec.k, 'k');
      const lead = finite(spec.tLead, 'tLead');
      const lag = finite(spec.tLag, 'tLag');
      if (lead < 0 || lag < 0)
        throw new InputError(`field ${lead < 0 ? 'tLead' : 'tLag'}: time constants must be ≥ 0 s`, { field: lead < 0 ? 'tLead' : 'tLag' });
      if (lag === 0 && lead > 0)
        throw new InputError('field tLag: a lead–lag with tLag = 0 is improper and has no sampled form; give it a lag', { field: 'tLag' });
      return tfFromCoefficients([k, k * lead], [1, lag]);
    }
    case 'transfer-function': {
      const r = spec.tf.rational;
      if (P.degree(r.num) > P.degree(r.den)) {
        throw new InputError(
          'field expression: the controller is improper (more zeros than poles) and has no sampled form; add a filter pole',
          { field: 'expression' },
        );
      }
      return spec.tf;
    }
    default:
      throw new InputError(
        `controller kind ${(spec as { kind: string }).kind} has no sampled form (PID, lead–lag, transfer function and gain do)`,
        { field: 'kind' },
      );
  }
}

function choice<T extends string>(v: string, allowed: readonly T[], field: string): T {
  if (!(allowed as readonly string[]).includes(v))
    throw new InputError(`field ${field}: "${v}" is not one of ${allowed.join(', ')}`, { field });
  return v as T;
}

function finite(v: number, field: string): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) throw new InputError(`field ${field}: must be a finite number, got ${v}`, { field });
  return v;
}
