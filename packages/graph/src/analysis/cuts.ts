import {
  type FrequencyResponse,
  InputError,
  type LoopMargins,
  type LoopSource,
  type MarginOptions,
  type TransferFunction,
  cdiv,
  cx,
  defaultFrequencyGrid,
  frequencyResponse,
  loopMargins,
  loopMarginsOf,
  poly,
  unwrapAlong,
} from '@loopwright/lti';
import type { ParameterOverrides } from '../resolve.ts';
import { prepareCut } from './points.ts';
import { type Linearisable, type ReduceOptions, type Reduction, compiledOf, reductionOf, transmissionOfGraph } from './reduce.ts';
import { exactEvaluator } from './cut-exact.ts';
import type { CompiledGraph } from './linear-graph.ts';

/**
 * The loop transfer at a cut, with every other loop closed: the wire is opened, a signal u is
 * injected where it ended and the return r is read where it began; L = −r/u so that the
 * characteristic equation of the closed diagram is 1 + L = 0. Dead times outside the other
 * loops are kept exact in L(s); dead times inside them are Padé approximants there (L(s) must
 * be a rational function times one dead time). Frequency results at a cut (cutFrequencyData,
 * cutMargins) are exact in every dead time: they solve the diagram at s = jω.
 */
export function loopAtCutDetailed(d: Linearisable, wireId: string, overrides?: ParameterOverrides, opts: ReduceOptions = {}): Reduction {
  const c = compiledOf(d, overrides);
  const raw = transmissionOfGraph(prepareCut(c, wireId), opts);
  if (poly.isZero(raw.num))
    throw new InputError(`wire ${wireId}: no feedback loop passes through this wire (the loop transfer there is zero)`, { field: 'wire' });
  return reductionOf({ ...raw, num: poly.scale(raw.num, -1) }, opts);
}

export function loopAtCut(d: Linearisable, wireId: string, overrides?: ParameterOverrides, opts: ReduceOptions = {}): TransferFunction {
  return loopAtCutDetailed(d, wireId, overrides, opts).tf;
}

/**
 * How a cut's frequency response is evaluated, for the CLI and the editor to show:
 *  - 'rational': no dead time on the loop;
 *  - 'exact': every dead time as e^(−jωT); with dead times inside other loops the diagram is
 *    solved at s = jω, and their Padé approximants (see the reduction's delayHandling) stand in
 *    only for the closed-loop poles.
 */
export interface CutFrequencyMethod {
  method: 'rational' | 'exact';
  /** True when the diagram is solved at each s = jω (dead times inside other loops). */
  solved: boolean;
  note: string;
}

/** The loop at a cut as margins need it: L(s) for poles, and an exact L(jω) where that differs. */
export interface CutLoop {
  reduction: Reduction;
  /** Present when dead times sit inside other loops: the exact evaluator and its approximant. */
  source: LoopSource | null;
  frequency: CutFrequencyMethod;
}

/** The frequency method of a cut with no dead time on its loop (L(jω) read from the rational L(s)). */
export const RATIONAL_FREQUENCY: Readonly<CutFrequencyMethod> = Object.freeze({
  method: 'rational',
  solved: false,
  note: 'no dead time on the loop',
});

export function cutLoop(d: Linearisable, wireId: string, overrides?: ParameterOverrides, opts: ReduceOptions = {}): CutLoop {
  const c: CompiledGraph = compiledOf(d, overrides);
  const reduction = loopAtCutDetailed(c, wireId, undefined, opts);
  const h = reduction.delayHandling;
  if (h.mode !== 'pade') {
    if (!(reduction.tf.delay > 0)) return { reduction, source: null, frequency: { ...RATIONAL_FREQUENCY } };
    const note = `dead time ${reduction.tf.delay} s kept exact as e^(-jωT)`;
    return { reduction, source: null, frequency: { method: 'exact', solved: false, note } };
  }
  const ev = exactEvaluator(prepareCut(c, wireId));
  const source: LoopSource = {
    approximant: reduction.tf,
    evaluate: (w) => {
      const v = ev(w);
      return cx(-v.re, -v.im);
    },
    delaySum: ev.delaySum,
  };
  const note =
    `every dead time exact: the diagram is solved at s = jω; the Padé (${h.order},${h.order}) approximant of ` +
    `${h.blocks.join(', ')} stands in only for the closed-loop poles`;
  return { reduction, source, frequency: { method: 'exact', solved: true, note } };
}

/** Margins at a cut, every dead time exact in the frequency figures (see cutLoop). */
export function cutMargins(
  d: Linearisable,
  wireId: string,
  overrides?: ParameterOverrides,
  opts: ReduceOptions & MarginOptions = {},
): { margins: LoopMargins; loop: CutLoop } {
  const loop = cutLoop(d, wireId, overrides, opts);
  const mopts: MarginOptions = {
    ...(opts.deadline !== undefined ? { deadline: opts.deadline } : {}),
    ...(opts.maxListedCrossovers ? { maxListedCrossovers: opts.maxListedCrossovers } : {}),
  };
  const margins = loop.source ? loopMarginsOf(loop.source, mopts) : loopMargins(loop.reduction.tf, mopts);
  return { margins, loop };
}

/** Bode and Nyquist data at a cut: L(jω) and the sensitivities S = 1/(1 + L), T = L/(1 + L). */
export interface CutFrequencyData {
  omega: number[];
  /** L(jω): re/im (Nyquist), magDb and continuous phaseDeg (Bode). */
  loop: FrequencyResponse;
  sensitivity: { re: number[]; im: number[]; magDb: number[] };
  complementary: { re: number[]; im: number[]; magDb: number[] };
  /** How L(jω) was evaluated (exact dead times; solved at s = jω or not). */
  frequency: CutFrequencyMethod;
}

/**
 * L(jω) of a cut's loop on a grid: from L(s) when every dead time is exact there, else from the
 * diagram solved at each s = jω, the phase unwrapped along the approximant's continuous phase.
 */
export function cutLoopResponse(
  cl: { reduction: { tf: TransferFunction }; source: LoopSource | null },
  grid: readonly number[],
): FrequencyResponse {
  const loop = frequencyResponse(cl.reduction.tf, grid);
  if (!cl.source) return loop;
  const re: number[] = [];
  const im: number[] = [];
  for (const w of grid) {
    const v = cl.source.evaluate(w);
    re.push(v.re);
    im.push(v.im);
  }
  const phaseDeg = unwrapAlong(re, im, loop.phaseDeg);
  return { omega: loop.omega, re, im, magDb: re.map((x, i) => 20 * Math.log10(Math.hypot(x, im[i]))), phaseDeg };
}

/** Frequency data of the loop at a cut, on the given grid or on the loop's default grid. */
export function cutFrequencyData(
  d: Linearisable,
  wireId: string,
  overrides?: ParameterOverrides,
  omegas?: readonly number[],
  opts: ReduceOptions = {},
): CutFrequencyData {
  const cl = cutLoop(d, wireId, overrides, opts);
  const grid = omegas ?? defaultFrequencyGrid(cl.reduction.tf);
  const loop = cutLoopResponse(cl, grid);
  const db = (re: number, im: number) => 20 * Math.log10(Math.hypot(re, im));
  const S = { re: [] as number[], im: [] as number[], magDb: [] as number[] };
  const T = { re: [] as number[], im: [] as number[], magDb: [] as number[] };
  for (let i = 0; i < grid.length; i++) {
    const s = cdiv(cx(1), cx(1 + loop.re[i], loop.im[i]));
    const t = cdiv(cx(loop.re[i], loop.im[i]), cx(1 + loop.re[i], loop.im[i]));
    S.re.push(s.re);
    S.im.push(s.im);
    S.magDb.push(db(s.re, s.im));
    T.re.push(t.re);
    T.im.push(t.im);
    T.magDb.push(db(t.re, t.im));
  }
  return { omega: loop.omega, loop, sensitivity: S, complementary: T, frequency: cl.frequency };
}
