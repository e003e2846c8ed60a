/**
 * The sweep slider's mapping between positions in [0, 1] and values, and range edits. The
 * mapping is logarithmic in |value| for a log range of one sign; edits keep to the document's
 * rule (a log scale needs min > 0: structure check) and fall back to linear otherwise.
 */
import type { SweepRange } from './types.ts';

const clamp01 = (x: number) => (x < 0 ? 0 : x > 1 ? 1 : x);
const logOk = (r: SweepRange) => r.scale === 'log' && r.min * r.max > 0;

/** Slider position in [0, 1] → value. */
export function positionToValue(r: SweepRange, pos: number): number {
  const p = clamp01(pos);
  if (logOk(r)) {
    const sign = r.min < 0 ? -1 : 1;
    const a = Math.log(Math.abs(r.min));
    const b = Math.log(Math.abs(r.max));
    return sign * Math.exp(a + p * (b - a));
  }
  return r.min + p * (r.max - r.min);
}

/** Value → slider position in [0, 1] (clamped). */
export function valueToPosition(r: SweepRange, v: number): number {
  if (!Number.isFinite(v) || r.max === r.min) return 0;
  if (logOk(r)) {
    if (v * r.min <= 0) return 0;
    const a = Math.log(Math.abs(r.min));
    const b = Math.log(Math.abs(r.max));
    return clamp01((Math.log(Math.abs(v)) - a) / (b - a));
  }
  return clamp01((v - r.min) / (r.max - r.min));
}

/** The range widened (by a factor 2 on a log scale, 20 % on a linear one) so that it holds v; null when it already does. */
export function widenedRange(range: SweepRange, v: number): SweepRange | null {
  if (!Number.isFinite(v) || (v >= range.min && v <= range.max)) return null;
  const r = { ...range };
  if (v < r.min) r.min = r.scale === 'log' && v > 0 ? v / 2 : v - Math.abs(v) * 0.2;
  if (v > r.max) r.max = r.scale === 'log' && v > 0 ? v * 2 : v + Math.abs(v) * 0.2;
  if (r.scale === 'log' && !(r.min > 0)) r.scale = 'linear';
  return r;
}

/** A range edit applied, or null when it is not a range (max must stay above min); log falls back to linear unless min > 0. */
export function editedRange(range: SweepRange, patch: Partial<SweepRange>): SweepRange | null {
  const r = { ...range, ...patch };
  if (!(r.max > r.min) || !Number.isFinite(r.min) || !Number.isFinite(r.max)) return null;
  if (r.scale === 'log' && !(r.min > 0)) r.scale = 'linear';
  return r;
}
