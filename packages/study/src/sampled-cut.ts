/**
 * The loop at a cut when sampled controller blocks take part in it.
 *
 * Which loops count as sampled: the loop at the cut (every other loop closed) is read at a
 * sampled block that lies in series on every path of it (L ≡ 0 when that block's output is
 * zeroed) and in no other loop (L is linear in that block's transfer). The continuous rest P(s)
 * (L with that block replaced by 1) is taken behind a zero-order hold and the block's
 * computation delay, exactly: G(z) = C(z)·Z{hold · e^(−sDT) · P(s)} (the modified z-transform
 * for a dead time that is not a whole number of samples). For a single-rate loop the margins,
 * Ms and closed-loop poles are then exact.
 *
 * Approximated, and said so in the notes: every other sampled block that changes L (an inner,
 * usually faster loop of a multirate cascade, or a second sampled block in series) is taken as
 * its continuous design with its hold and computation delay as dead time, C(s)·e^(−s(T/2 + D·T)).
 * When every sampled block on the loop's path also sits in loops closed around the cut (the
 * inner loop of a sampled cascade), the loop is read at the slowest such block's input instead,
 * which opens every loop through that sampler (the usual definition of a sampled loop's margins:
 * broken at the sampler); the notes say so. When the loop has no sampled block on every path,
 * the sampled blocks it holds are all taken as estimates and the result says so.
 */
import { DEFAULT_PADE_ORDER, type Diagram, type LinearGraph, linearGraphOf, loopAtCutDetailed } from '@loopwright/graph';
import {
  type MarginFigures,
  type TransferFunction,
  cabs,
  csub,
  cx,
  loopMargins,
  marginFigures,
  tevalComplex,
  tfFromCoefficients,
  tmul,
} from '@loopwright/lti';
import {
  type SampleRateNote,
  type SampledMarginFigures,
  type ZPlaneGuides,
  holdAsDelay,
  sampledFrequencyGrid,
  sampledFrequencyResponse,
  sampledMarginFigures,
  sampledMargins,
  unitCircleEvaluator,
  zPlaneGuides,
  zPlaneLocus,
} from '@loopwright/sampled';
import { chooseCut } from './cuts.ts';
import { type SampledBlock, sampledBlocks } from './sampled-block.ts';
import { without } from './split.ts';
import { engineParameterName, withLiveValue } from './sweep-target.ts';
import type { Cx, LiveValue } from './types.ts';
import { assertAnalysable } from './validate.ts';

export interface SampledCutRequest {
  cut: string | null;
  overrides?: Record<string, number>;
  live?: LiveValue | null;
  fallback?: boolean;
  /** Also trace the z-plane locus of 1 + k·G(z) (k scales the loop gain; k = 1 is the design). */
  locus?: boolean;
}

/** How one sampled block enters the reading. */
export interface SampledBlockRole {
  block: string;
  sampleTime: number;
  computeDelay: number;
  /** 'sampler': the loop is read at this block, exactly; 'estimate': taken as C(s)·e^(−s(T/2 + D·T)); 'outside': does not change L. */
  role: 'sampler' | 'estimate' | 'outside';
}

export interface SampledLocusData {
  branches: { re: number[]; im: number[]; k: number[] }[];
  poles: Cx[];
  zeros: Cx[];
  /** Unit-circle crossings: loop-gain factor k, the point z, θ = ωT (rad) and ω (rad/s). */
  crossings: { gain: number; z: Cx; theta: number; omega: number }[];
  stableGainRanges: { from: number; to: number | null }[];
  criticalGain: number | null;
  guides: ZPlaneGuides;
  /** The closed-loop poles at k = 1 (the design). */
  design: Cx[];
}

export interface SampledCutData {
  cutId: string;
  wire: string;
  label: string;
  /** The sampled block the loop is read at (null: no sampled block in series; everything is an estimate). */
  sampler: string | null;
  /** True when the figures come from the exact pulse transfer function with nothing approximated. */
  exact: boolean;
  sampleTime: number;
  computeDelay: number;
  /** Margins of the sampled loop (exact pulse transfer function at the sampler). */
  margins: SampledMarginFigures | null;
  closedLoopPoles: Cx[];
  /** 'z' (pulse transfer function) or 's' (no sampler in series: the estimate's poles are not given). */
  closedLoopStable: boolean | null;
  /** G(z), ascending in z. */
  pulse: { num: number[]; den: number[] } | null;
  /** The continuous estimate (hold as e^(−sT/2), delay as dead time), labelled as an estimate. */
  estimate: { label: string; margins: MarginFigures } | null;
  /** The continuous design without any sampling. */
  continuous: MarginFigures | null;
  /** G(e^(jωT)) up to the Nyquist frequency π/T. */
  frequency: { omega: number[]; magDb: number[]; phaseDeg: number[]; re: number[]; im: number[] } | null;
  roles: SampledBlockRole[];
  /** Sample time against crossover. */
  warnings: SampleRateNote[];
  /** What is exact and what is approximated, in words. */
  notes: string[];
  locus: SampledLocusData | null;
}

const ESTIMATE_LABEL = 'continuous estimate (hold as e^(−sT/2), computation delay as dead time): an approximation, not the sampled loop';
const PROBES = [0.37, 1.9, 11.3];

/** L evaluated at a few frequencies (scaled to the loop's speed) to tell whether a change alters it. */
function samplesOf(L: TransferFunction, scale: number): { re: number; im: number }[] {
  return PROBES.map((w) => tevalComplex(L, cx(0, w * scale)));
}
const differ = (a: { re: number; im: number }[], b: { re: number; im: number }[]) =>
  a.some((v, i) => !(cabs(csub(v, b[i])) <= 1e-9 * Math.max(1e-300, cabs(v), cabs(b[i]))));

function withBlock(g: LinearGraph, id: string, tf: TransferFunction): LinearGraph {
  return { ...g, blocks: g.blocks.map((b) => (b.id === id ? { id, kind: 'transfer' as const, tf } : b)) };
}

const asEstimate = (s: SampledBlock): TransferFunction => holdAsDelay(s.continuous, s.sampling.sampleTime, s.sampling.computeDelay);

/** The sampled reading of the loop at a cut; null when no sampled block changes that loop (or there is no loop). */
export function sampledCutStudy(d: Diagram, req: SampledCutRequest): SampledCutData | null {
  const { diagram, overrides } = withLiveValue(d, req.overrides ?? {}, req.live);
  assertAnalysable(diagram, req.live ? without(overrides, engineParameterName(req.live.target)) : overrides);
  const cut = chooseCut(diagram, req.cut, overrides, req.fallback === true);
  if (!cut) return null;
  const sampled = sampledBlocks(diagram, overrides);
  if (sampled.length === 0) return null;
  const opts = { padeOrder: DEFAULT_PADE_ORDER };
  const g0 = linearGraphOf(diagram, overrides);
  const L0 = loopAtCutDetailed(g0, cut.wire, undefined, opts).tf;
  const scale = Math.max(...sampled.map((s) => 1 / s.sampling.sampleTime)) / 100;
  const base = samplesOf(L0, scale);

  // Classify every sampled block: on every path of the loop (zeroing it leaves no loop), and
  // then in no other loop closed around the cut (L linear in it: a sampler the cut's loop can
  // be read at as it is), or changing L otherwise, or outside.
  const linear: SampledBlock[] = [];
  const series: SampledBlock[] = [];
  const affecting: SampledBlock[] = [];
  for (const s of sampled) {
    let zeroed: TransferFunction | null;
    try {
      zeroed = loopAtCutDetailed(withBlock(g0, s.block.id, tfFromCoefficients([0], [1])), cut.wire, undefined, opts).tf;
    } catch {
      zeroed = null; // no loop left through the cut: the block is on every path
    }
    if (zeroed !== null && !differ(base, samplesOf(zeroed, scale))) continue;
    affecting.push(s);
    if (zeroed !== null) continue;
    series.push(s);
    const doubled = loopAtCutDetailed(
      withBlock(g0, s.block.id, tmul(tfFromCoefficients([2], [1]), s.continuous)),
      cut.wire,
      undefined,
      opts,
    ).tf;
    if (
      !differ(
        base.map((v) => cx(2 * v.re, 2 * v.im)),
        samplesOf(doubled, scale),
      )
    )
      linear.push(s);
  }
  if (affecting.length === 0) return null;
  // Read the loop at the slowest sampler it holds alone; else (every sampler on its path also
  // sits in loops closed around the cut, as an inner loop of a cascade does) at the slowest one
  // on its path (faster ones on the path belong to loops nested inside: a cascade's outer
  // controllers run slower), at that block's input, which opens every loop through it.
  const slowest = (xs: SampledBlock[]) => xs.reduce((a, b) => (b.sampling.sampleTime > a.sampling.sampleTime ? b : a));
  const sampler = linear.length ? slowest(linear) : series.length ? slowest(series) : null;
  const readWire =
    sampler && !linear.includes(sampler) ? (diagram.wires.find((w) => w.to.block === sampler.block.id)?.id ?? null) : cut.wire;
  const roles: SampledBlockRole[] = sampled.map((s) => ({
    block: s.block.id,
    sampleTime: s.sampling.sampleTime,
    computeDelay: s.sampling.computeDelay,
    role: s === sampler ? 'sampler' : affecting.includes(s) ? 'estimate' : 'outside',
  }));
  const estimated = affecting.filter((s) => s !== sampler);
  const notes: string[] = [];
  if (estimated.length) {
    notes.push(
      `approximated: ${estimated.map((s) => `${s.block.id} (T = ${s.sampling.sampleTime} s)`).join(', ')} taken as continuous with the hold and computation delay as dead time e^(−s(T/2 + D·T))`,
    );
  }
  let g1 = g0;
  for (const s of estimated) g1 = withBlock(g1, s.block.id, asEstimate(s));

  if (!sampler) {
    // No sampler to read the loop at: only the estimate of the whole loop.
    const Le = loopAtCutDetailed(g1, cut.wire, undefined, opts).tf;
    notes.push(
      'no sampled block lies in series in this loop alone (it is not read at a sampler): the figures are the continuous estimate only',
    );
    const first = affecting[0];
    return {
      cutId: cut.id,
      wire: cut.wire,
      label: cut.label,
      sampler: null,
      exact: false,
      sampleTime: first.sampling.sampleTime,
      computeDelay: first.sampling.computeDelay,
      margins: null,
      closedLoopPoles: [],
      closedLoopStable: null,
      pulse: null,
      estimate: { label: ESTIMATE_LABEL, margins: marginFigures(loopMargins(Le)) },
      continuous: marginFigures(loopMargins(L0)),
      frequency: null,
      roles,
      warnings: [],
      notes,
      locus: null,
    };
  }

  const T = sampler.sampling.sampleTime;
  const D = sampler.sampling.computeDelay;
  const red = loopAtCutDetailed(withBlock(g1, sampler.block.id, tfFromCoefficients([1], [1])), readWire ?? cut.wire, undefined, opts);
  if (readWire !== cut.wire) {
    notes.push(
      `${sampler.block.id} also sits in the loops closed around this cut: the loop is read at its input (wire ${readWire}), which opens every loop through it; its closed-loop poles are those of the whole diagram with the other rates as estimates`,
    );
  }
  const plant = red.tf;
  const handling = red.delayHandling;
  if (handling.mode === 'pade')
    notes.push(`a dead time inside another loop (${handling.blocks.join(', ')}) is taken as a Padé approximant in P(s)`);
  const m = sampledMargins({
    plant,
    sampleTime: T,
    computeDelay: D,
    controller: sampler.controller.transfer,
    continuousController: sampler.continuous,
  });
  notes.unshift(
    `read at the sampled block ${sampler.block.id}: G(z) = C(z)·Z{hold · e^(−s·${D}·T) · P(s)}, T = ${T} s, exact pulse transfer function${plant.delay > 0 && !Number.isInteger(plant.delay / T) ? ' (modified z-transform for the fractional dead time)' : ''}`,
  );
  if (sampler.controller.coefficients.umin > -Infinity || sampler.controller.coefficients.umax < Infinity)
    notes.push(`the output limits of ${sampler.block.id} play no part in the margins (linear analysis)`);
  const ev = unitCircleEvaluator(m.pulse);
  const fr = sampledFrequencyResponse(
    m.pulse,
    sampledFrequencyGrid(ev, 60).filter((w) => w > 0),
  );
  let locus: SampledLocusData | null = null;
  if (req.locus) {
    const z = zPlaneLocus(m.pulse);
    locus = {
      branches: z.branches.map((br) => ({ re: br.map((p) => p.s.re), im: br.map((p) => p.s.im), k: br.map((p) => p.k) })),
      poles: z.poles,
      zeros: z.zeros,
      crossings: z.crossings.map((c) => ({ gain: c.gain, z: c.z, theta: c.theta, omega: c.omega })),
      stableGainRanges: z.stableGainRanges,
      criticalGain: z.criticalGain,
      guides: zPlaneGuides(T),
      design: m.closedLoopPoles,
    };
  }
  return {
    cutId: cut.id,
    wire: cut.wire,
    label: cut.label,
    sampler: sampler.block.id,
    exact: estimated.length === 0 && handling.mode !== 'pade',
    sampleTime: T,
    computeDelay: D,
    margins: sampledMarginFigures(m),
    closedLoopPoles: m.closedLoopPoles,
    closedLoopStable: m.closedLoopStable,
    pulse: { num: [...m.pulse.rational.num], den: [...m.pulse.rational.den] },
    estimate: m.continuousEstimate ? { label: m.continuousEstimate.label, margins: marginFigures(m.continuousEstimate.margins) } : null,
    continuous: m.continuous ? marginFigures(m.continuous) : null,
    frequency: { omega: fr.omega, magDb: fr.magDb, phaseDeg: fr.phaseDeg, re: fr.re, im: fr.im },
    roles,
    warnings: m.notes,
    notes,
    locus,
  };
}
