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
import { part } from './part.ts';
import { polesStudy, type PolesRequest } from './poles.ts';
import { responseStudy, type RunContext, type RunRequest } from './run.ts';
import { exportStudy, type ExportData, type ExportRequest } from './sampled.ts';
import { sampledCutStudy, type SampledCutData, type SampledCutRequest } from './sampled-cut.ts';
import type { CheckData, ClosedLoopData, FrequencyData, LocusData, LoopsData, Part, PolesData, ResponseResult } from './types.ts';
import { checkStudy } from './validate.ts';

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
  /** Code, coefficients and test vector of a sampled controller block. */
  export: { request: ExportRequest; result: ExportData };
  /** The loop at a cut read at its sampled controller (exact pulse transfer function); null: no sampled block in that loop. */
  'sampled-cut': { request: SampledCutRequest; result: SampledCutData | null };
}

export type StudyKind = keyof StudyKinds;
export type StudyRequest = { [K in StudyKind]: { kind: K } & StudyKinds[K]['request'] }[StudyKind];
export type StudyResultOf<K extends StudyKind> = StudyKinds[K]['result'];
export type StudyResult = { [K in StudyKind]: { kind: K; value: StudyKinds[K]['result'] } }[StudyKind];

/**
 * What a study may be given besides plain data: a cancellation poll and a deadline. Runs honour
 * both now; the analyses will pass the deadline on as the math packages accept one.
 */
export type StudyContext = RunContext;

type Handlers = { [K in StudyKind]: (d: Diagram, req: { kind: K } & StudyKinds[K]['request'], ctx: StudyContext) => StudyKinds[K]['result'] };

const HANDLERS: Handlers = {
  check: (d, r) => checkStudy(d, r.overrides ?? {}),
  locus: (d, r) => locusStudy(d, r),
  poles: (d, r) => polesStudy(d, r),
  cut: (d, r) => cutStudy(d, r),
  loops: (d, r) => loopsStudy(d, r),
  'closed-loop': (d, r) => closedLoopStudy(d, r),
  run: (d, r, ctx) => responseStudy(d, r, ctx),
  export: (d, r) => exportStudy(d, r),
  'sampled-cut': (d, r) => sampledCutStudy(d, r),
};

/** Runs one study; throws what it throws (InputError for bad input, naming what is wrong). */
export function runStudy<K extends StudyKind>(d: Diagram, req: { kind: K } & StudyKinds[K]['request'], ctx: StudyContext = {}): StudyKinds[K]['result'] {
  const handler = HANDLERS[req.kind] as unknown as (d: Diagram, r: typeof req, c: StudyContext) => StudyKinds[K]['result'];
  if (!handler) throw new Error(`unknown study kind "${String((req as { kind: unknown }).kind)}"`);
  return handler(d, req, ctx);
}

/** Runs several studies of one diagram; each result is a part of its own (one failure does not blank the rest). */
export function runStudies(d: Diagram, reqs: readonly StudyRequest[], ctx: StudyContext = {}): Part<StudyResult>[] {
  return reqs.map((r) => part(() => ({ kind: r.kind, value: runStudy(d, r, ctx) }) as StudyResult));
}
