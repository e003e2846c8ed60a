/**
 * A study is a request about a diagram and its plain-data result. Every kind is one entry of
 * `StudyKinds` (request fields, result type) and one line of `HANDLERS`; fits, tunings and
 * sampled-loop analyses join the same way. Both apps call `runStudy` (or `runStudies` for a
 * batch in which each part fails on its own), so they give the same numbers.
 */
import type { Diagram } from '@loopwright/graph';
import { closedLoopStudy, type ClosedLoopRequest } from './closed-loop.ts';
import { cutStudy, type CutRequest } from './cuts.ts';
import { locusStudy, type LocusRequest } from './locus.ts';
import { loopsStudy, type LoopsRequest } from './loops.ts';
import { withTextMemo } from './fingerprint.ts';
import { part } from './part.ts';
import { polesStudy, type PolesRequest } from './poles.ts';
import { responseStudy, type RunContext, type RunRequest } from './run.ts';
import { exportStudy, type ExportData, type ExportRequest } from './sampled.ts';
import { sampledCutStudy, type SampledCutData, type SampledCutRequest } from './sampled-cut.ts';
import type { CheckData, ClosedLoopData, FrequencyData, LocusData, LoopsData, Part, PolesData, ResponseResult } from './types.ts';
import { checkStudy } from './validate.ts';
import { fitStudy, testLogStudy, type FitRequest, type TestLogRequest } from './fit-study.ts';
import { tuneStudy, type TuneRequest } from './tune-study.ts';
import { cascadeStudy, type CascadeRequest } from './cascade-study.ts';
import { dampingStudy, type DampingRequest } from './damping-study.ts';
import type { CascadeData, DampingData, FitData, TestLogData, TuneData } from './types.ts';
import { reportStudy, type ReportData, type ReportRequest } from './report/report.ts';

export interface StudyKinds {
  /** Every finding of the diagram (what `loopwright check` lists). */
  check: { request: { overrides?: Record<string, number> }; result: CheckData };
  /** The locus of a sweep. */
  locus: { request: LocusRequest; result: LocusData };
  /** Closed-loop poles of the whole diagram. */
  poles: { request: PolesRequest; result: PolesData };
  /** Frequency data of L at one cut (null: the diagram has no loop). */
  cut: { request: CutRequest; result: FrequencyData | null };
  /** The loops table. */
  loops: { request: LoopsRequest; result: LoopsData };
  /** The closed-loop transfer function between two points. */
  'closed-loop': { request: ClosedLoopRequest; result: ClosedLoopData };
  /** A time simulation. */
  run: { request: RunRequest; result: ResponseResult };
  /** The columns of a CSV test log (no diagram needed). */
  'test-log': { request: TestLogRequest; result: TestLogData };
  /** Process models fitted to a CSV test log (no diagram needed). */
  fit: { request: FitRequest; result: FitData };
  /** A suggested controller setting for a loop (by its cut) or a model expression. */
  tune: { request: TuneRequest; result: TuneData };
  /** Every loop tuned inner-first, innermost first. */
  cascade: { request: CascadeRequest; result: CascadeData };
  /** The swept value that gives the dominant poles a target damping. */
  damping: { request: DampingRequest; result: DampingData };
  /** The design report (self-contained HTML) with everything it shows computed here. */
  report: { request: ReportRequest; result: ReportData };
  /** Code, coefficients and test vector of a sampled controller block. */
  export: { request: ExportRequest; result: ExportData };
  /** The loop at a cut read at its sampled controller (exact pulse transfer function); null: no sampled block in that loop. */
  'sampled-cut': { request: SampledCutRequest; result: SampledCutData | null };
}

export type StudyKind = keyof StudyKinds;
export type StudyRequest = { [K in StudyKind]: { kind: K } & StudyKinds[K]['request'] }[StudyKind];
export type StudyResultOf<K extends StudyKind> = StudyKinds[K]['result'];
export type StudyResult = { [K in StudyKind]: { kind: K; value: StudyKinds[K]['result'] } }[StudyKind];

/** How far a batch of studies has got: part `part` (0-based) of `parts`, and the fraction of that part done when it says (runs do). */
export interface StudyProgress {
  part: number;
  parts: number;
  kind: StudyKind;
  /** 0..1 within the part; null when the part cannot tell (an analysis in one piece). */
  fraction: number | null;
}

/**
 * What a study may be given besides plain data: a cancellation poll, a deadline and a progress
 * callback. Runs honour all three and report progress per part; every analysis passes the
 * deadline on to graph and lti, which stop past it with a BudgetError naming the analysis (a
 * failed part with reason 'budget'; the CLI's exit 2).
 */
export interface StudyContext extends Omit<RunContext, 'onProgress'> {
  onProgress?: (p: StudyProgress) => void;
}

type Handlers = { [K in StudyKind]: (d: Diagram, req: { kind: K } & StudyKinds[K]['request'], ctx: RunContext) => StudyKinds[K]['result'] };

const HANDLERS: Handlers = {
  check: (d, r, ctx) => checkStudy(d, r.overrides ?? {}, ctx.deadline),
  locus: (d, r, ctx) => locusStudy(d, r, ctx.deadline),
  poles: (d, r, ctx) => polesStudy(d, r, ctx.deadline),
  cut: (d, r, ctx) => cutStudy(d, r, ctx.deadline),
  loops: (d, r, ctx) => loopsStudy(d, r, ctx.deadline),
  'closed-loop': (d, r, ctx) => closedLoopStudy(d, r, ctx.deadline),
  run: (d, r, ctx) => responseStudy(d, r, ctx),
  'test-log': (_d, r) => testLogStudy(r),
  fit: (_d, r) => fitStudy(r),
  tune: (d, r) => tuneStudy(d, r),
  cascade: (d, r) => cascadeStudy(d, r),
  damping: (d, r) => dampingStudy(d, r),
  report: (d, r, ctx) => reportStudy(d, r, ctx),
  export: (d, r) => exportStudy(d, r),
  'sampled-cut': (d, r) => sampledCutStudy(d, r),
};

/** Runs one study; throws what it throws (InputError for bad input, naming what is wrong). */
export function runStudy<K extends StudyKind>(
  d: Diagram,
  req: { kind: K } & StudyKinds[K]['request'],
  ctx: StudyContext = {},
): StudyKinds[K]['result'] {
  return runPart(d, req, ctx, 0, 1);
}

function runPart<K extends StudyKind>(
  d: Diagram,
  req: { kind: K } & StudyKinds[K]['request'],
  ctx: StudyContext,
  i: number,
  n: number,
): StudyKinds[K]['result'] {
  const handler = HANDLERS[req.kind] as unknown as (d: Diagram, r: typeof req, c: RunContext) => StudyKinds[K]['result'];
  if (!handler) throw new Error(`unknown study kind "${String((req as { kind: unknown }).kind)}"`);
  const report = ctx.onProgress;
  report?.({ part: i, parts: n, kind: req.kind, fraction: null });
  const inner: RunContext = {};
  if (ctx.isCancelled) inner.isCancelled = ctx.isCancelled;
  if (ctx.deadline !== undefined) inner.deadline = ctx.deadline;
  if (report) inner.onProgress = (fraction) => report({ part: i, parts: n, kind: req.kind, fraction });
  return handler(d, req, inner);
}

/** Runs several studies of one diagram; each result is a part of its own (one failure does not blank the rest). */
export function runStudies(d: Diagram, reqs: readonly StudyRequest[], ctx: StudyContext = {}): Part<StudyResult>[] {
  return withTextMemo(() => reqs.map((r, i) => part(() => ({ kind: r.kind, value: runPart(d, r, ctx, i, reqs.length) }) as StudyResult)));
}
