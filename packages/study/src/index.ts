// Public API of @loopwright/study: the one engine both apps call — a diagram and a request in,
// plain-data results out. Apps decide nothing about the analysis; they parse, call, and show.
export * from './types.ts';
export { runStudy, runStudies, type StudyKinds, type StudyKind, type StudyRequest, type StudyResult, type StudyResultOf, type StudyContext } from './study.ts';
export { part, failure, isInputError, isBudgetError, errorAt, type FailedPart } from './part.ts';
export { diagramFingerprint, engineText, fingerprintText } from './fingerprint.ts';
export {
  targetKey,
  parseTargetKey,
  engineParameterName,
  documentValue,
  engineDiagram,
  checkTarget,
  withLiveValue,
  targetRange,
  sweepChoices,
  preferredChoice,
  resolveSweep,
  type SweepSelection,
  type ResolvedSweep,
} from './sweep-target.ts';
export { positionToValue, valueToPosition, widenedRange, editedRange } from './slider.ts';
export { checkStudy, findingsOf, findingText, assertAnalysable, RefusedDiagram } from './validate.ts';
export { locusStudy, type LocusRequest } from './locus.ts';
export { polesStudy, stableFrom, type PolesRequest } from './poles.ts';
export { chooseCut, cutStudy, frequencyOfLoop, type ChosenCut, type CutRequest } from './cuts.ts';
export { loopsStudy, type LoopsRequest } from './loops.ts';
export { parseSignalRef, closedLoopStudy, type ClosedLoopRequest } from './closed-loop.ts';
export {
  responseStudy,
  automaticEnd,
  runSettings,
  shownProbes,
  actuatorsOf,
  DEFAULT_RTOL,
  DEFAULT_ATOL,
  OUTPUT_POINTS,
  DEFAULT_RUN_MS,
  type RunRequest,
  type RunContext,
} from './run.ts';
export { loopOfExpression, expressionMargins, expressionLocus, type ExpressionLoop, type PadeNote } from './loop-expression.ts';
export { resultsComplete, type PartProgress } from './complete.ts';
export { clearCaches } from './caches.ts';
export { transferData, rhpPoleCount } from './transfer-data.ts';
export { sampledBlockOf, sampledBlocks, requireSampledBlock, type SampledBlock } from './sampled-block.ts';
export {
  expressionSampledMargins,
  expressionSampledLocus,
  exportStudy,
  codeNameOf,
  type ExpressionSampling,
  type ExportRequest,
  type ExportData,
} from './sampled.ts';
export { sampledCutStudy, type SampledCutRequest, type SampledCutData, type SampledBlockRole, type SampledLocusData } from './sampled-cut.ts';
// The test vector's JSON form, for apps that write the export's files.
export { testVectorToJson } from '@loopwright/sampled';
export { simulatedTestVector, testBenchDiagram } from './block-test-vector.ts';
