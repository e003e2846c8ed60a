/**
 * The sweep as the editor shows it. Which quantity is swept, its range and the slider mapping
 * are decided by @loopwright/study (one answer for the sweep bar, the canvas highlight, the
 * Parameters panel and the requests); here only the readout format lives.
 */
export {
  documentValue,
  engineParameterName,
  positionToValue,
  preferredChoice,
  resolveSweep,
  sweepChoices,
  targetKey,
  valueToPosition,
  widenedRange,
  editedRange,
  type SweepChoice,
  type SweepRange,
  type SweepTarget,
} from '@loopwright/study';

/** Number formatting for readouts: 4 significant digits, exponent form outside 1e-3..1e5 (the study's, shared with the report). */
export { formatNumber as fmt } from '@loopwright/study';
