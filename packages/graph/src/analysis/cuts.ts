import { InputError, type TransferFunction, poly } from '@loopwright/lti';
import type { ParameterOverrides } from '../resolve.ts';
import { prepareCut } from './points.ts';
import { type Linearisable, type ReduceOptions, type Reduction, compiledOf, reductionOf, transmissionOfGraph } from './reduce.ts';

/**
 * The loop transfer at a cut, with every other loop closed: the wire is opened, a signal u is
 * injected where it ended and the return r is read where it began; L = −r/u so that the
 * characteristic equation of the closed diagram is 1 + L = 0. Dead times outside the other
 * loops are kept exact (frequency response and margins use them exactly).
 */
export function loopAtCutDetailed(d: Linearisable, wireId: string, overrides?: ParameterOverrides, opts: ReduceOptions = {}): Reduction {
  const c = compiledOf(d, overrides);
  const raw = transmissionOfGraph(prepareCut(c, wireId), opts);
  if (poly.isZero(raw.num)) throw new InputError(`wire ${wireId}: no feedback loop passes through this wire (the loop transfer there is zero)`, { field: 'wire' });
  return reductionOf({ ...raw, num: poly.scale(raw.num, -1) }, opts);
}

export function loopAtCut(d: Linearisable, wireId: string, overrides?: ParameterOverrides, opts: ReduceOptions = {}): TransferFunction {
  return loopAtCutDetailed(d, wireId, overrides, opts).tf;
}
