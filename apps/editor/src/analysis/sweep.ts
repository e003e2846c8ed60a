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

/** Number formatting for readouts: 4 significant digits, exponent form outside 1e-3..1e5. */
export function fmt(v: number | null | undefined, digits = 4): string {
  if (v === null || v === undefined || Number.isNaN(v)) return '—';
  if (v === Infinity) return '∞';
  if (v === -Infinity) return '−∞';
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) return v.toExponential(digits - 1);
  return String(Number(v.toPrecision(digits)));
}
