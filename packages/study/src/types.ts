/**
 * The result shapes of every study: plain, structured-clone-safe data (no class instances, no
 * functions, no Maps), so that a worker can post them and the command line can print them as
 * JSON. Polynomials are ascending; complex numbers are {re, im}.
 */
import type { CutFrequencyMethod, DelayHandling, Finding, Separation, SignalRef } from '@loopwright/graph';
import type { MarginFigures } from '@loopwright/lti';
import type { FitProvenance, ProcessFit, ProcessModel, ProcessModelKind, fitSummary } from '@loopwright/fit';
import type { ControllerSetting, TuneRule } from '@loopwright/tune';
import type { ControllerPatch } from './controller-block.ts';
import type { LoopAdvice } from './loop-advice.ts';

export type { LoopAdvice };

export type { DelayHandling, Finding, SignalRef };

export interface Cx {
  re: number;
  im: number;
}

/**
 * A result part that may fail on its own (an unstable cut must not blank the locus).
 * `reason`: 'input' — the diagram or request is at fault (the message names what); 'budget' —
 * the analysis ran out of time or size (the message names which); 'internal' — a bug.
 * `at` names the block, wire, field or character position at fault where known.
 */
export type Part<T> = { ok: true; value: T } | { ok: false; error: string; reason: 'input' | 'budget' | 'internal'; at: string | null };

// ------------------------------------------------------------------------------ sweep

/** What the sweep moves: a named parameter, or the numeric k of a gain block. */
export type SweepTarget = { kind: 'parameter'; name: string } | { kind: 'block'; block: string; field: 'k' };

export interface SweepRange {
  min: number;
  max: number;
  scale: 'linear' | 'log';
}

export interface SweepChoice {
  /** `param:<name>` or `block:<id>.k`. */
  key: string;
  target: SweepTarget;
  label: string;
  /** The value in the document. */
  value: number;
  /** The document's range for it (its sweep, its slider range, else a decade each side). */
  range: SweepRange;
}

/** A value held for a sweep target without writing it into the document (the live slider value). */
export interface LiveValue {
  target: SweepTarget;
  value: number;
}

/**
 * How a result at a live value was computed: 'affine' from pieces precomputed once per edit (the
 * value enters the linear model once, so every loop is (A + k·B)/(C + k·D) in it); 'full' by
 * recomputing the diagram (no live value, or one that enters more than once or not affinely).
 */
export type SweepPath = 'affine' | 'full';

export interface LocusBranch {
  re: number[];
  im: number[];
  /** Sweep value at each point (signed: negative on a k < 0 locus). */
  k: number[];
}

export interface LocusAngleData {
  at: Cx;
  angleDeg: number;
  multiplicity: number;
}

export interface LocusData {
  /** exact: the characteristic polynomial is affine in the swept value (root-locus geometry of the whole diagram); sampled: roots at sampled values. */
  mode: 'exact' | 'sampled';
  /** Sweep target key and the parameter name the engine varies (a gain block gets a synthetic one). */
  target: string;
  parameter: string;
  /** The direction of `branches` and the geometry: the sign of the swept value (k < 0: 'negative'). */
  direction: 'positive' | 'negative';
  branches: LocusBranch[];
  /** The branches again, traced densely over the slider range only (exact mode; null otherwise). */
  rangeBranches: LocusBranch[] | null;
  /** The locus for values of the other sign, when asked for (drawn dashed). */
  oppositeBranches: LocusBranch[] | null;
  /** Roots of D0 and N0 after common factors are removed (exact); the ends of the range (sampled). */
  poles: Cx[];
  zeros: Cx[];
  /** Closed-loop poles that do not move with the swept value (common roots of N0 and D0). */
  fixedPoles: Cx[];
  /** How each of poles, zeros and fixedPoles was found (with a dead time inside a loop: Padé marks). */
  poleOrigin: PoleOrigin[];
  zeroOrigin: PoleOrigin[];
  fixedOrigin: PoleOrigin[];
  asymptotes: { centroid: number; anglesDeg: number[] } | null;
  realAxisSegments: [number, number][];
  breakaways: { s: Cx; gain: number }[];
  crossings: { omega: number; gain: number }[];
  departures: LocusAngleData[];
  arrivals: LocusAngleData[];
  /** The full split D0 + k·N0 (ascending; exact mode only): closed-loop poles at k and the gain at a clicked point. */
  n0: number[] | null;
  d0: number[] | null;
  range: SweepRange;
  delayHandling: DelayHandling;
  /** Why the locus is sampled (null when exact). */
  reason: string | null;
}

// ------------------------------------------------------------------------------ poles

/**
 * How a closed-loop pole was found. 'exact': no dead time was approximated. With a dead time
 * inside a loop the poles are those of a Padé approximant: 'approximated' poles stay put when
 * the Padé order is raised by two (they approximate true roots of the characteristic
 * equation); 'approximant' poles move (they belong to the approximation, not to the plant).
 */
export type PoleOrigin = 'exact' | 'approximated' | 'approximant';

export interface PolesData {
  poles: Cx[];
  origin: PoleOrigin[];
  delayHandling: DelayHandling;
  stable: boolean;
  /** How the poles at the live value were found (see SweepPath). */
  sweepPath?: SweepPath;
}

// ------------------------------------------------------------------------------ cuts and loops

/** A transfer function: num/den ascending (monic denominator) times e^(−s·delay). */
export interface TransferData {
  num: number[];
  den: number[];
  delay: number;
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
  /** Poles of L in the open right half-plane (Nyquist: encirclements of −1 needed for stability). */
  openLoopRhpPoles: number;
  loop: TransferData;
  /** How dead times enter L(s) (its poles): exact, or Padé where they sit inside other loops. */
  delayHandling: DelayHandling;
  /** How L(jω) here (curves and margins) was evaluated: 'rational', or 'exact' in every dead time (solved at s = jω when `solved`). */
  frequencyMethod: CutFrequencyMethod;
  /** What the margins could not say plainly: crossovers past a stated frequency, limited accuracy, … */
  notes: string[];
  /** How L at the live value was found (see SweepPath). */
  sweepPath?: SweepPath;
}

/** One reading of a loop: L at the cut with a given set of other loops opened. */
export interface LoopReading {
  loop: TransferData;
  margins: MarginsData;
  openLoopRhpPoles: number;
  /** Cut ids opened for this reading (the loops around this one); empty: every other loop closed. */
  opened: string[];
}

export interface LoopRow {
  /** Cut id, or "auto:<wire>" for a loop the engine proposed on a feedback wire. */
  cutId: string;
  wire: string;
  /** The loop's one name (loopName: the cut's label, else its id), as the canvas shows it. */
  label: string;
  auto: boolean;
  stable: boolean;
  blocks: string[];
  /** With every other loop closed. */
  margins: MarginsData;
  loop: TransferData;
  openLoopRhpPoles: number;
  delayHandling: DelayHandling;
  /** How L(jω) was evaluated for the margins (see FrequencyData.frequencyMethod). */
  frequencyMethod: CutFrequencyMethod;
  /** The margins' notes (crossovers past a stated frequency, limited accuracy, …). */
  notes: string[];
  hiddenModes: Cx[];
  /** The same cut read inner-first: the loops around it opened (null when none enclose it). */
  alone: LoopReading | null;
  /** Bode/Nyquist/S/T data of L (every other loop closed), when the request asked for it. */
  frequency: FrequencyData | null;
  /** Which reading to act on, and why (the open-loop RHP pole counts explain a negative PM). */
  advice: LoopAdvice;
}

/** Inner/outer separation of a nested pair (graph's Separation: plain data). */
export type SeparationRow = Separation;

/**
 * The outer loop of a nested pair with the real inner loop against an ideal (unity) one. Both
 * readings — margins and curves — use one configuration: the loops around the outer one opened.
 */
export interface OuterIdealData {
  outer: string;
  inner: string;
  omega: number[];
  realMagDb: number[];
  realPhaseDeg: number[];
  idealMagDb: number[];
  idealPhaseDeg: number[];
  realMargins: MarginsData;
  idealMargins: MarginsData;
  realLoop: TransferData;
  idealLoop: TransferData;
  /** Cut ids opened for both readings. */
  opened: string[];
}

export interface LoopsData {
  rows: LoopRow[];
  /** The one name of each loop by cut id (rows, separations, real-vs-ideal pairs, opened lists). */
  names: Record<string, string>;
  separations: SeparationRow[];
  /** Every nested pair (each inner loop with the smallest loop around it). */
  outerVsIdeal: OuterIdealData[];
  closedLoopPoles: Cx[];
  /** How each closed-loop pole was found (Padé marks, see PoleOrigin). */
  closedLoopPoleOrigin: PoleOrigin[];
  delayHandling: DelayHandling;
  /** Whole-diagram stability from the closed-loop poles. */
  stable: boolean;
  notes: string[];
  /** How the table at the live value was found (see SweepPath). */
  sweepPath?: SweepPath;
}

// ------------------------------------------------------------------------------ closed loop

export interface ClosedLoopData {
  from: SignalRef;
  to: SignalRef;
  /** "block r", "wire w3". */
  fromLabel: string;
  toLabel: string;
  transfer: TransferData;
  poles: Cx[];
  zeros: Cx[];
  /** How each pole and zero was found (with a dead time inside a loop: Padé marks, see PoleOrigin). */
  poleOrigin: PoleOrigin[];
  zeroOrigin: PoleOrigin[];
  /** Leading-coefficient gain k of k·Π(s − z)/Π(s − p); static gain T(0) (±Infinity with a pole at 0). */
  gain: number;
  staticGain: number;
  delayHandling: DelayHandling;
  hiddenModes: Cx[];
  bode: { omega: number[]; magDb: number[]; phaseDeg: number[] } | null;
  /** Exact step response of the rational part times the dead time (null when not asked or not finite). */
  step: { time: number[]; value: number[] } | null;
}

// ------------------------------------------------------------------------------ runs

export interface ActuatorInfo {
  /** Trace key ("wire:<id>") of the limited signal. */
  key: string;
  block: string;
  label: string;
  lower: number | null;
  upper: number | null;
}

export interface RunTrace {
  time: number[];
  /** Keyed by probe id, and "wire:<id>" for recorded wires. */
  traces: Record<string, number[]>;
  status: 'ok' | 'diverged' | 'stiff' | 'budget' | 'cancelled';
  message: string;
  timeReached: number;
  events: { time: number; kind: string; block: string }[];
  stats: { steps: number; accepted: number; rejected: number; evaluations: number; segments: number; wallMs: number };
  /** The simulator's figures per probe (null: not measurable; none for a linear overlay, which is only drawn) and per limiting block. */
  probeFigures: Record<string, ProbeFigures | null>;
  actuatorFigures: Record<string, { timeInSaturation: number; peakEffort: number; limitHits: number }>;
}

export interface ProbeFigures {
  riseTime: number | null;
  overshootPct: number | null;
  peakTime: number | null;
  peak: number | null;
  settlingTime: number | null;
  steadyState: number | null;
  steadyStateError: number | null;
  undershootPct: number | null;
  iae: number | null;
  ise: number | null;
}

/** One row of the response table: a probe's figures, or an actuator's. */
export type MetricsRow = {
  /** Probe id, or the actuator's trace key. */
  probe: string;
  label: string;
} & Pick<ProbeFigures, 'riseTime' | 'overshootPct' | 'peakTime' | 'peak' | 'settlingTime' | 'steadyState' | 'steadyStateError' | 'iae'> & {
    timeInSaturation: number | null;
    peakEffort: number | null;
    limitHits: number | null;
  };

/** The settings a run used and where its end time came from. */
export interface RunSettings {
  until: number;
  untilFrom: 'request' | 'diagram' | 'automatic';
  rtol: number;
  atol: number;
  outputStep: number;
  maxSteps: number | null;
}

export interface ResponseResult {
  /** The run as drawn (with its nonlinearities), or the linear model when the request asked for that alone. */
  run: RunTrace;
  model: 'as-drawn' | 'linear';
  /** The linear model's run for an overlay (null when not asked for). */
  linear: RunTrace | null;
  /** Every probe of the diagram with its unit (the probe's unit field; null when none is given). */
  probes: { id: string; label: string; unit: string | null }[];
  /** Probes the diagram shows (simulation.probes, else every probe), in diagram order. */
  shownProbes: string[];
  actuators: ActuatorInfo[];
  metrics: MetricsRow[];
  settings: RunSettings;
  /** Same as settings.until (kept for the views). */
  until: number;
}

// ------------------------------------------------------------------------------ checks

export interface CheckData {
  findings: Finding[];
  counts: { error: number; warning: number; info: number };
}

// ------------------------------------------------------------------------------ test logs and fits

/** The columns of a test log before any is chosen, and the ones a fit would use. */
export interface TestLogData {
  fileName: string | null;
  /** Every column: the header's names, else "column N". */
  columns: string[];
  header: boolean;
  separator: ',' | ';' | '\t';
  decimal: '.' | ',';
  rows: number;
  /** The columns chosen (by the request, else 1, 2, 3), by name. */
  chosen: { time: string; input: string; output: string };
}

/** One model fitted to the log: @loopwright/fit's ProcessFit, its CLI summary and its provenance (what a block's fit record holds). */
export type FittedModel = ProcessFit & { summary: ReturnType<typeof fitSummary>; provenance: FitProvenance };

export interface FitData {
  /** Where the log came from (as a fit's provenance names it) and its series. */
  log: FitProvenance['source'] & { time: number[]; input: number[]; output: number[] };
  /** One part per model asked for, in the order asked (a model that does not fit fails on its own). */
  fits: { model: ProcessModelKind; result: Part<FittedModel> }[];
  /** The caution shown beside every fit. */
  caution: string;
}

// ------------------------------------------------------------------------------ tunings

/** Set-point and load-disturbance step responses of a loop before (null: no loop today) and after a tuning; null where a run stopped early. */
export interface StepResponses {
  time: number[];
  setpoint: { before: (number | null)[] | null; after: (number | null)[] };
  load: { before: (number | null)[] | null; after: (number | null)[] };
  /** Why a run stopped early (null: it ran to the end). */
  status: { before: string | null; after: string | null };
}

/** A suggested setting as the CLI and views show it: @loopwright/tune's suggestion reduced to plain figures. */
export interface TuneData {
  rule: TuneRule;
  /** What was tuned: a cut of the diagram, or a model expression. */
  source: 'cut' | 'model';
  cut: { id: string; wire: string; label: string } | null;
  reading: 'closed' | 'inner-first';
  /** Cut ids opened for the reading (inner-first: the loops around it). */
  opened: string[];
  /** The controller block set by the suggestion and what it holds today (null: a model with no block named). */
  block: { id: string; label: string; current: ControllerSetting; derivativeFilter: number } | null;
  /** What the controller sees, P = L/C (or the model given). */
  process: TransferData;
  /** true when P does not depend on the controller (see loop-reading.ts); false: divided by today's controller. */
  processExact: boolean;
  delayHandling: DelayHandling | null;
  /** The low-order model a rule used (null for the ms and zn-ultimate rules). */
  model: ProcessModel | null;
  /** How that model came from P: 'model' (P has that form), 'half rule', 'step fit' (least squares on P's exact step response), or null. */
  modelFrom: 'model' | 'half rule' | 'step fit' | null;
  /** Ku and Pu (zn-ultimate): from the diagram's own crossing. */
  ultimate: { ku: number; pu: number; omega: number; from: 'frequency response' | 'root locus' | 'model' } | null;
  controller: ControllerSetting;
  derivativeFilter: number;
  settings: Record<string, number>;
  /** Margins of the loop with the suggestion in place (at the cut, read as asked; or C·P of the model). */
  predicted: MarginsData;
  /** The same figures for the loop as it is today (null: no loop today, or a model). */
  current: MarginsData | null;
  /** L with the suggestion in place (what `loopwright margins --loop` reads back). */
  loop: TransferData;
  /** The edit that applies the suggestion (null: no block). */
  apply: ControllerPatch | null;
  responses: StepResponses | null;
  notes: string[];
  caution: string;
}

/** Inner-first tuning of every loop of a cascade: one step per loop, innermost first. */
export interface CascadeData {
  rule: TuneRule;
  steps: { cut: string; label: string; depth: number; result: Part<TuneData> }[];
  /** Separation ratios with every suggestion applied (flagged below 3). */
  separations: SeparationRow[];
  /** Each loop's margins with every suggestion applied, every other loop closed. */
  final: { cut: string; label: string; margins: MarginsData }[];
  /** Every step's edit, in order (apply them in this order). */
  apply: ControllerPatch[];
  notes: string[];
  caution: string;
}

/** The gain for a target damping on the exact locus of the current sweep. */
export interface DampingData {
  zeta: number;
  target: string;
  parameter: string;
  /** The swept value that puts the dominant poles at damping ζ (null: no dominant crossing). */
  value: number | null;
  /** 'strict': no closed-loop pole to their right; 'oscillatory': only real poles to their right (see notes). */
  dominance: 'strict' | 'oscillatory' | null;
  /** The document's value now. */
  current: number;
  pole: Cx | null;
  naturalFrequency: number | null;
  poles: Cx[];
  /** Every crossing of the ζ line, ascending |value|. */
  crossings: { value: number; pole: Cx; dominant: boolean }[];
  delayHandling: DelayHandling;
  notes: string[];
}
