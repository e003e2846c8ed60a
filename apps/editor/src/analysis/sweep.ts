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
  valueInForce,
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
import { formatNumber } from '@loopwright/study';

/**
 * A tick of a log frequency axis: decades beyond 1000 or below 0.01 as "1e5", "1e-3" (short
 * enough that eight decades in a small chart do not run together; "10000 1.0e5" did), any
 * other value as the readouts write it.
 */
export function fmtLogTick(v: number): string {
  const e = Math.round(Math.log10(v));
  if (v > 0 && (e > 3 || e < -2) && Math.abs(v / 10 ** e - 1) < 1e-9) return `1e${e}`;
  return formatNumber(v, 2);
}
