import { type FrequencyResponse, InputError, type TransferFunction, cdiv, cx, defaultFrequencyGrid, frequencyResponse, poly } from '@loopwright/lti';
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

/** Bode and Nyquist data at a cut: L(jω) and the sensitivities S = 1/(1 + L), T = L/(1 + L). */
export interface CutFrequencyData {
  omega: number[];
  /** L(jω): re/im (Nyquist), magDb and continuous phaseDeg (Bode). */
  loop: FrequencyResponse;
  sensitivity: { re: number[]; im: number[]; magDb: number[] };
  complementary: { re: number[]; im: number[]; magDb: number[] };
}

/** Frequency data of the loop at a cut, on the given grid or on the loop's default grid. */
export function cutFrequencyData(d: Linearisable, wireId: string, overrides?: ParameterOverrides, omegas?: readonly number[], opts: ReduceOptions = {}): CutFrequencyData {
  const L = loopAtCut(d, wireId, overrides, opts);
  const grid = omegas ?? defaultFrequencyGrid(L);
  const loop = frequencyResponse(L, grid);
  const db = (re: number, im: number) => 20 * Math.log10(Math.hypot(re, im));
  const S = { re: [] as number[], im: [] as number[], magDb: [] as number[] };
  const T = { re: [] as number[], im: [] as number[], magDb: [] as number[] };
  for (let i = 0; i < grid.length; i++) {
    const s = cdiv(cx(1), cx(1 + loop.re[i], loop.im[i]));
    const t = cdiv(cx(loop.re[i], loop.im[i]), cx(1 + loop.re[i], loop.im[i]));
    S.re.push(s.re); S.im.push(s.im); S.magDb.push(db(s.re, s.im));
    T.re.push(t.re); T.im.push(t.im); T.magDb.push(db(t.re, t.im));
  }
  return { omega: loop.omega, loop, sensitivity: S, complementary: T };
}
