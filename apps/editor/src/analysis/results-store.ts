/**
 * The latest engine results, derived from the document and the live sweep value (never a
 * source of truth: the driver overwrites them whenever their inputs change). `generation`
 * counts input changes; `renderedGeneration` is set by the analysis area after it has drawn
 * the results of a generation, so tests and the bench can wait for "all views updated".
 */
import { create } from 'zustand';
import type { AnalysisResult, ResponseResult } from '../worker/protocol.ts';

export interface ResultsState {
  generation: number;
  /** performance.now() when the inputs of `generation` changed. */
  generationAt: number;
  analysis: AnalysisResult | null;
  /** Generation of the newest analysis request, and of the analysis result held. */
  analysisWanted: number;
  analysisGeneration: number;
  analysisError: string | null;
  response: ResponseResult | null;
  responseWanted: number;
  responseGeneration: number;
  responseError: string | null;
  renderedGeneration: number;
  /** Input-to-drawn latencies (ms) of recent generations, newest last. */
  latencies: number[];
}

export const useResultsStore = create<ResultsState>()(() => ({
  generation: 0,
  generationAt: 0,
  analysis: null,
  analysisWanted: 0,
  analysisGeneration: 0,
  analysisError: null,
  response: null,
  responseWanted: 0,
  responseGeneration: 0,
  responseError: null,
  renderedGeneration: 0,
  latencies: [],
}));

/** True when every channel holds the result of the request it was last sent. */
export const resultsComplete = (s: ResultsState): boolean =>
  s.analysisGeneration === s.analysisWanted && s.responseGeneration === s.responseWanted;
