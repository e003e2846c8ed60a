/**
 * Messages between the editor and its engine worker, and the result shapes the views draw.
 * Everything here is plain structured-clone data (no class instances, no functions).
 *
 * Two channels: 'analysis' (locus, closed-loop poles, frequency data at the cut, loops table)
 * and 'response' (time simulation). Each request carries an id that grows per channel; the
 * worker answers only the newest request it holds per channel and the client drops any reply
 * that is not for its newest request.
 */
import type { Diagram } from '@loopwright/graph';
import type { MarginFigures } from '@loopwright/lti';

export interface Cx {
  re: number;
  im: number;
}

/** A result part that may fail on its own (an unstable cut must not blank the locus). */
export type Part<T> = { ok: true; value: T } | { ok: false; error: string };

export interface SweepSpec {
  /** Engine parameter name (a gain block target is already rewritten into one). */
  parameter: string;
  value: number;
  negative: boolean;
  /** The slider range: the part of the locus traced densely (what the slider can reach). */
  min: number;
  max: number;
}

export interface LocusBranch {
  re: number[];
  im: number[];
  /** Sweep value at each point. */
  k: number[];
}

export interface LocusData {
  mode: 'exact' | 'sampled';
  parameter: string;
  negative: boolean;
  branches: LocusBranch[];
  /** The branches again, traced densely over the slider range only (exact mode; null otherwise). */
  rangeBranches: LocusBranch[] | null;
  /** The k < 0 locus, when asked for (drawn dashed). */
  negativeBranches: LocusBranch[] | null;
  /** Open-loop poles and zeros of the swept characteristic equation D0 + k·N0 = 0 (exact mode). */
  poles: Cx[];
  zeros: Cx[];
  asymptotes: { centroid: number; anglesDeg: number[] } | null;
  breakaways: { s: Cx; gain: number }[];
  crossings: { omega: number; gain: number }[];
  /** D0 and N0, ascending, for the gain at a clicked point (exact mode only). */
  n0: number[] | null;
  d0: number[] | null;
}

export type MarginsData = MarginFigures;

export interface FrequencyData {
  cutId: string;
  wire: string;
  label: string;
  omega: number[];
  magDb: number[];
  phaseDeg: number[];
  re: number[];
  im: number[];
  /** |S| and |T| in dB, S = 1/(1+L), T = L/(1+L). */
  sensDb: number[];
  compDb: number[];
  margins: MarginsData;
}

export interface LoopRow {
  /** Cut id, or "auto:<wire>" for a loop the engine proposed on a feedback wire. */
  cutId: string;
  wire: string;
  label: string;
  auto: boolean;
  stable: boolean;
  blocks: string[];
  margins: MarginsData;
  /** The same cut read inner-first: the loops around it opened (null when none enclose it). */
  alone: { margins: MarginsData; opened: string[] } | null;
}

export interface SeparationRow {
  inner: string;
  outer: string;
  ratio: number | null;
  basis: string;
  flag: boolean;
  note: string;
}

export interface OuterIdealData {
  outer: string;
  inner: string;
  omega: number[];
  realMagDb: number[];
  realPhaseDeg: number[];
  idealMagDb: number[];
  idealPhaseDeg: number[];
  realMargins: MarginsData | null;
  idealMargins: MarginsData | null;
}

export interface LoopsData {
  rows: LoopRow[];
  separations: SeparationRow[];
  outerVsIdeal: OuterIdealData[];
  /** Whole-diagram stability from the closed-loop poles. */
  stable: boolean;
  notes: string[];
}

export interface AnalysisResult {
  locus: Part<LocusData> | null;
  poles: Part<Cx[]>;
  frequency: Part<FrequencyData> | null;
  /** Worker compute time, ms. */
  elapsedMs: number;
}

export interface LoopsResult {
  loops: Part<LoopsData>;
  elapsedMs: number;
}

export interface ActuatorInfo {
  /** Trace key ("wire:<id>") of the limited signal. */
  key: string;
  block: string;
  label: string;
  lower: number | null;
  upper: number | null;
}

export interface SimRun {
  time: number[];
  traces: Record<string, number[]>;
  status: string;
  message: string;
}

export interface MetricsRow {
  probe: string;
  label: string;
  riseTime: number | null;
  overshootPct: number | null;
  peakTime: number | null;
  settlingTime: number | null;
  steadyState: number | null;
  steadyStateError: number | null;
  iae: number | null;
  timeInSaturation: number | null;
  peakEffort: number | null;
}

export interface ResponseResult {
  nonlinear: SimRun;
  linear: SimRun;
  probes: { id: string; label: string }[];
  actuators: ActuatorInfo[];
  metrics: MetricsRow[];
  until: number;
  elapsedMs: number;
}

export type Channel = 'analysis' | 'loops' | 'response';

export interface AnalysisRequest {
  channel: 'analysis';
  id: number;
  diagram: Diagram;
  sweep: SweepSpec | null;
  cutId: string | null;
  /** Frequency data at the cut only when a view shows it (saves a reduction per slider step). */
  frequency: boolean;
}

export interface LoopsRequest {
  channel: 'loops';
  id: number;
  diagram: Diagram;
  overrides: Record<string, number>;
}

export interface ResponseRequest {
  channel: 'response';
  id: number;
  diagram: Diagram;
  overrides: Record<string, number>;
  until: number | null;
}

export type EngineRequest = AnalysisRequest | LoopsRequest | ResponseRequest;

export type EngineReply =
  | { channel: 'analysis'; id: number; ok: true; result: AnalysisResult }
  | { channel: 'loops'; id: number; ok: true; result: LoopsResult }
  | { channel: 'response'; id: number; ok: true; result: ResponseResult }
  | { channel: Channel; id: number; ok: false; error: string };
