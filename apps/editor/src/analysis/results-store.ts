/**
 * The latest engine results, derived from the document and the live sweep value (never a
 * source of truth: the driver overwrites them whenever their inputs change). `generation`
 * counts input changes; each channel records the generation it was last asked for and the
 * one its held result belongs to. `renderedGeneration` is set by the analysis area after it
 * has drawn a complete generation, so tests and the bench can wait for "all views updated".
 */
import { create } from 'zustand';
import {
  resultsComplete as allIn,
  type CheckData,
  type ClosedLoopData,
  type FrequencyData,
  type LocusData,
  type LoopsData,
  type Part,
  type PolesData,
  type ResponseResult,
  type SampledCutData,
  type StudyKind,
} from '@loopwright/study';
import { CHANNELS, type Channel, type ViewChannel } from '../worker/protocol.ts';

/** What the analysis channel gives back: the locus of the sweep, the closed-loop poles, L at the cut. */
export interface AnalysisResult {
  locus: Part<LocusData> | null;
  poles: Part<PolesData>;
  frequency: Part<FrequencyData> | null;
  /** The loop at the cut read at its sampled controller (null: not asked for, or no sampled block in that loop). */
  sampled?: Part<SampledCutData> | null;
  /** Worker compute time, ms. */
  elapsedMs: number;
}

/** A computation in progress on a channel: since when, and how far the worker says it has got. */
export interface Busy {
  /** performance.now() when the request went out. */
  since: number;
  /** 0..1 of the whole request (parts done plus the share of the running part), null while unknown. */
  fraction: number | null;
  /** The study kind being computed now. */
  kind: StudyKind | null;
}

/**
 * The pinned design re-run under the current simulation settings (Compare): its result, or the
 * reason it cannot be compared (a run that fails, or one of another length).
 */
export type PinnedRun = { ok: true; value: ResponseResult } | { ok: false; error: string };

export interface ResultsState {
  generation: number;
  /** performance.now() when the inputs of `generation` changed. */
  generationAt: number;
  /** Findings of the document (checkDiagram, run in the worker once per edit). */
  check: CheckData | null;
  analysis: AnalysisResult | null;
  loops: Part<LoopsData> | null;
  /** Each cut's loop read at its sampler (diagrams with sampled blocks; else empty). */
  sampledLoops?: SampledCutData[];
  response: ResponseResult | null;
  /** The transfer function between the Closed loop view's two points. */
  closedLoop: Part<ClosedLoopData> | null;
  /** The pinned design re-run under the current simulation settings (null: nothing pinned or not yet run). */
  pinnedRun: PinnedRun | null;
  /** Per channel: generation of the newest request, and of the result held. */
  wanted: Record<ViewChannel, number>;
  held: Record<ViewChannel, number>;
  errors: Record<ViewChannel, string | null>;
  /** Worker compute time of the latest result per channel, ms. */
  computeMs: Record<ViewChannel, number>;
  /** Channels computing now (the report's too), for the progress bar and its Cancel. */
  busy: Record<Channel, Busy | null>;
  renderedGeneration: number;
  /** performance.now() when the last reply of each channel arrived (latency breakdown). */
  arrivedAt: Record<ViewChannel, number>;
  /** Per drawn generation: [input→last reply, last reply→drawn] in ms, newest last. */
  breakdown: [number, number][];
  /** Input-to-drawn latencies (ms) of recent generations, newest last. */
  latencies: number[];
}

const perChannel = <T>(v: T): Record<ViewChannel, T> => Object.fromEntries(CHANNELS.map((c) => [c, v])) as Record<ViewChannel, T>;

export const useResultsStore = create<ResultsState>()(() => ({
  generation: 0,
  generationAt: 0,
  check: null,
  analysis: null,
  loops: null,
  response: null,
  closedLoop: null,
  pinnedRun: null,
  wanted: perChannel(0),
  held: perChannel(0),
  errors: perChannel<string | null>(null),
  computeMs: perChannel(0),
  busy: { ...perChannel<Busy | null>(null), report: null },
  renderedGeneration: 0,
  arrivedAt: perChannel(0),
  breakdown: [],
  latencies: [],
}));

/** True when every channel holds the result of the request it was last sent (the study's "all results in"). */
export const resultsComplete = (s: Pick<ResultsState, 'wanted' | 'held'>): boolean => allIn(s, CHANNELS);
