// Public API of @loopwright/study: the one engine both apps call — a diagram and a request in,
// plain-data results out. Apps decide nothing about the analysis; they parse, call, and show.
export * from './types.ts';
export {
  runStudy,
  runStudies,
  type StudyProgress,
  type StudyKinds,
  type StudyKind,
  type StudyRequest,
  type StudyResult,
  type StudyResultOf,
  type StudyContext,
} from './study.ts';
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
  valueInForce,
  type SweepSelection,
  type ResolvedSweep,
} from './sweep-target.ts';
export { positionToValue, valueToPosition, widenedRange, editedRange } from './slider.ts';
export { checkStudy, findingsOf, findingText, assertAnalysable, RefusedDiagram } from './validate.ts';
export { locusIdentity, locusStudy, type LocusRequest } from './locus.ts';
export { polesStudy, stableFrom, padeOrigins, originAt, type PolesRequest } from './poles.ts';
export { chooseCut, cutStudy, frequencyOfLoop, type ChosenCut, type CutRequest } from './cuts.ts';
export { loopsStudy, type LoopsRequest } from './loops.ts';
export { liveReader, type LiveReader } from './affine-loop.ts';
export { parseSignalRef, closedLoopStudy, type ClosedLoopRequest } from './closed-loop.ts';
export {
  responseStudy,
  responsePanels,
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
export { loopAdvice, type LoopAdvice } from './loop-advice.ts';
export { cutName, loopName } from './names.ts';
export { loopOfExpression, expressionMargins, expressionLocus, type ExpressionLoop, type PadeNote } from './loop-expression.ts';
export { resultsComplete, type PartProgress } from './complete.ts';
export { clearCaches } from './caches.ts';
export { transferData, rhpPoleCount } from './transfer-data.ts';
export { testLogStudy, fitStudy, type TestLogRequest, type FitRequest } from './fit-study.ts';
export { tuneStudy, modelOfProcess, type TuneRequest } from './tune-study.ts';
export { cascadeStudy, type CascadeRequest } from './cascade-study.ts';
export { dampingStudy, type DampingRequest } from './damping-study.ts';
export {
  loopBlocks,
  controllerOfCut,
  currentSetting,
  controllerPatch,
  applyControllerPatch,
  settingParams,
  type ControllerPatch,
} from './controller-block.ts';
export {
  configureLoop,
  readLoop,
  seenProcess,
  ultimateOfLoop,
  READING_MODES,
  type LoopReadingMode,
  type LoopConfiguration,
  type SeenProcess,
  type DiagramUltimate,
} from './loop-reading.ts';
export { loopStepResponses, rationalText, transferText, responseHorizon, type LoopForm } from './loop-responses.ts';
export { fitRecord, withFittedBlock, withFittedModel, REPLACEABLE_BY_FIT } from './fitted-block.ts';
// What the apps show beside fits and tunings, and the choices they offer, from the packages that own them.
export { FIT_CAUTION, PROCESS_MODEL_KINDS, demoTestLogs, type ProcessModel, type ProcessModelKind } from '@loopwright/fit';
export { TUNE_CAUTION, TUNE_RULES, type ControllerSetting, type TuneRule } from '@loopwright/tune';
export { reportStudy, type ReportRequest, type ReportData } from './report/report.ts';
export { designReportHtml, SAFETY_CAUTION, ORIGIN_TEXT } from './report/html.ts';
export { fmt as formatNumber, fmtS as formatComplex, dampingOf } from './report/format.ts';
export { plotSvg, ticks, type PlotPanel, type PlotSeries, type PlotAxis } from './report/svg-plot.ts';
export { keyPoints, activePoints, pointsNear, locusFocus } from './locus-frame.ts';
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
export {
  sampledCutStudy,
  type SampledCutRequest,
  type SampledCutData,
  type SampledBlockRole,
  type SampledLocusData,
} from './sampled-cut.ts';
// The test vector's JSON form, for apps that write the export's files.
export { testVectorToJson } from '@loopwright/sampled';
export { simulatedTestVector, testBenchDiagram } from './block-test-vector.ts';
