import { InputError } from '@loopwright/lti';
import type { ParamSpec, ResolvedParams } from './types.ts';

/**
 * The sampling fields of a controller block (PID, lead–lag, transfer function, gain): one shared
 * fragment, spread into those specs' parameter lists. A blank (or zero) sample time leaves the
 * block continuous; with a sample time the block runs as a difference equation at its own
 * instants k·T, its output held in between (zero-order hold) and applied `computeDelay` samples
 * after the input was sampled. The block's linear form stays its continuous transfer function (the
 * design it stands for); the sampled analysis and the simulator read these fields. Field names
 * are those of `@loopwright/sampled` (`SamplingSettings`).
 */

/** Discretisation of a transfer-type controller: zero-order-hold equivalent, Tustin, matched pole–zero. */
export const SAMPLED_METHODS = ['zoh', 'tustin', 'matched'] as const;
/** The PID integral: backward, forward or trapezoidal (Tustin) difference. */
export const SAMPLED_INTEGRALS = ['backward', 'forward', 'tustin'] as const;
/** The PID's filtered derivative: backward difference or Tustin. */
export const SAMPLED_DERIVATIVES = ['backward', 'tustin'] as const;

/** The block kinds that may be sampled, and which sampling fields each has. */
export type SampledKind = 'pid' | 'lead-lag' | 'transfer-function' | 'gain';

const sampleTime: ParamSpec = {
  name: 'sampleTime',
  label: 'Sample time',
  unit: 's',
  type: 'number',
  default: '',
  blank: 0,
  min: 0,
  max: 1e6,
  description: 'Blank (or 0) = continuous; else the block runs every sample time, its output held in between',
};
const computeDelay: ParamSpec = {
  name: 'computeDelay',
  label: 'Computation delay',
  unit: 'samples',
  type: 'number',
  default: 0,
  min: 0,
  max: 1000,
  description: 'Samples from reading the input to applying the output: 0 none, 1 one sample, or a fraction such as 0.5',
};
const method: ParamSpec = {
  name: 'method',
  label: 'Discretisation',
  type: 'choice',
  default: 'tustin',
  choices: SAMPLED_METHODS,
  description: 'zoh: zero-order-hold equivalent; tustin: bilinear (optionally prewarped); matched: matched pole–zero',
};
const prewarp: ParamSpec = {
  name: 'prewarp',
  label: 'Prewarp frequency',
  unit: 'rad/s',
  type: 'number',
  default: '',
  blank: NaN,
  min: 0,
  exclusiveMin: true,
  max: 1e12,
  description: 'Tustin only: the frequency kept exact (below π/T); blank = plain Tustin',
};
const integral: ParamSpec = {
  name: 'integral',
  label: 'Integral difference',
  type: 'choice',
  default: 'backward',
  choices: SAMPLED_INTEGRALS,
  description: 'How the integral is summed each sample: backward, forward or trapezoidal (tustin)',
};
const derivative: ParamSpec = {
  name: 'derivative',
  label: 'Derivative difference',
  type: 'choice',
  default: 'backward',
  choices: SAMPLED_DERIVATIVES,
  description: 'How the filtered derivative is discretised: backward difference or tustin',
};

/** The sampling fields of a kind, appended to its parameter list (`params: [..., ...samplingParams('pid')]`). */
export function samplingParams(kind: SampledKind): ParamSpec[] {
  switch (kind) {
    case 'pid':
      return [sampleTime, computeDelay, integral, derivative];
    case 'gain':
      return [sampleTime, computeDelay];
    default:
      return [sampleTime, computeDelay, method, prewarp];
  }
}

/** The names of every sampling field (for views that group them). */
export const SAMPLING_FIELDS: readonly string[] = ['sampleTime', 'computeDelay', 'method', 'prewarp', 'integral', 'derivative'];

/** Whether a kind has sampling fields. */
export const isSampledKind = (kind: string): kind is SampledKind =>
  kind === 'pid' || kind === 'lead-lag' || kind === 'transfer-function' || kind === 'gain';

/** Whether a raw (document) sample-time field is set: a positive number, or a non-blank text other than "0". */
export function sampleTimeSet(t: unknown): boolean {
  return typeof t === 'number' ? t > 0 : typeof t === 'string' && t.trim() !== '' && t.trim() !== '0';
}

/**
 * Whether a sampling field matters for a block with these (raw or resolved) parameters: every
 * field but the sample time only when a sample time is set, the prewarp frequency only with Tustin.
 */
export function samplingFieldVisible(name: string, params: Readonly<Record<string, unknown>>): boolean {
  if (name === 'sampleTime') return true;
  if (!sampleTimeSet(params.sampleTime)) return false;
  if (name === 'prewarp') return (params.method ?? 'tustin') === 'tustin';
  return true;
}

/** How a block is sampled, from its resolved parameters (the shape of `@loopwright/sampled`'s `SamplingSettings`). */
export interface BlockSampling {
  sampleTime: number;
  computeDelay: number;
  method?: (typeof SAMPLED_METHODS)[number];
  prewarp?: number;
  integral?: (typeof SAMPLED_INTEGRALS)[number];
  derivative?: (typeof SAMPLED_DERIVATIVES)[number];
}

/**
 * The sampling of a block from its resolved parameters, or null for a continuous block (a kind
 * without sampling fields, or a blank/zero sample time). A prewarp frequency at or above the
 * Nyquist frequency π/T is an InputError naming the field.
 */
export function samplingOf(kind: string, p: ResolvedParams): BlockSampling | null {
  if (!isSampledKind(kind)) return null;
  const T = p.sampleTime;
  if (typeof T !== 'number' || !(T > 0)) return null;
  const D = typeof p.computeDelay === 'number' ? p.computeDelay : 0;
  const out: BlockSampling = { sampleTime: T, computeDelay: D };
  if (kind === 'pid') {
    out.integral = (p.integral as BlockSampling['integral']) ?? 'backward';
    out.derivative = (p.derivative as BlockSampling['derivative']) ?? 'backward';
  } else if (kind !== 'gain') {
    out.method = (p.method as BlockSampling['method']) ?? 'tustin';
    const w = p.prewarp;
    if (out.method === 'tustin' && typeof w === 'number' && Number.isFinite(w)) {
      if (!(w * T < Math.PI)) {
        throw new InputError(
          `field prewarp: ${w} rad/s is at or above the Nyquist frequency π/T = ${Math.PI / T} rad/s of the sample time ${T} s`,
          { field: 'prewarp' },
        );
      }
      out.prewarp = w;
    }
  }
  return out;
}
