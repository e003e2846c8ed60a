import { InputError, type TransferFunction, tmul, transfer } from '@loopwright/lti';
import { type DiscreteTransferFunction, checkSampleTime, dtMul } from './discrete.ts';
import { checkComputeDelay, holdEquivalent } from './hold.ts';

/**
 * A loop closed through a sampler: e(k) is sampled every T, a sampled controller C(z) (optional)
 * computes u(k), which reaches the zero-order hold D samples later (computation delay) and drives
 * the continuous part (with its own dead time). Unity negative feedback: 1 + C(z)·G(z) = 0.
 */
export interface SampledLoop {
  /**
   * The continuous part behind the hold, with its dead time: the plant, or the whole continuous
   * loop L(s) when there is no separate sampled controller.
   */
  plant: TransferFunction;
  sampleTime: number;
  /** Computation delay in samples (0 none, 1 one sample, or a fraction); default 0. */
  computeDelay?: number;
  /** A sampled controller C(z) in series (e.g. `discretizeController(…).transfer`). */
  controller?: DiscreteTransferFunction;
  /** The continuous controller C(z) stands for, used only for the continuous estimate. */
  continuousController?: TransferFunction;
}

/** The loop's pulse transfer function C(z)·G(z), G the hold equivalent of the plant with the computation delay. */
export function loopPulseTransfer(loop: SampledLoop): DiscreteTransferFunction {
  const T = checkSampleTime(loop.sampleTime);
  const G = holdEquivalent(loop.plant, T, { computeDelay: checkComputeDelay(loop.computeDelay) });
  if (!loop.controller) return G;
  if (Math.abs(loop.controller.sampleTime - T) > 1e-12 * T) {
    throw new InputError(`controller: its sample time ${loop.controller.sampleTime} s differs from the loop's ${T} s`, {
      field: 'controller',
    });
  }
  return dtMul(loop.controller, G);
}

/**
 * The continuous loop the sampled one approximates (plant × continuous controller), or null when
 * a sampled controller has no continuous counterpart given.
 */
export function continuousLoopOf(loop: SampledLoop): TransferFunction | null {
  if (!loop.controller) return loop.plant;
  return loop.continuousController ? tmul(loop.continuousController, loop.plant) : null;
}

/**
 * The continuous estimate of the sampled loop: the hold as e^(−sT/2) (half a sample of lag)
 * plus the computation delay D·T, as extra dead time on the continuous loop.
 */
export function holdAsDelay(L: TransferFunction, sampleTime: number, computeDelay = 0): TransferFunction {
  return transfer(L.rational, L.delay + (0.5 + checkComputeDelay(computeDelay)) * checkSampleTime(sampleTime));
}
