/**
 * Source waveforms (catalogue source.ts): each is 0 before `start` and added to `offset`:
 * step amplitude; ramp amplitude·(t − start); sinusoid amplitude·sin(omega·(t − start));
 * pulse amplitude during [start + k·period, start + k·period + width).
 * `piece` is a time inside the current integration segment: segments end at every edge, so
 * the waveform is evaluated on the piece that contains `piece`, which keeps each segment
 * smooth up to its end points (the left limit at its end, the right limit at its start).
 */
export const SHAPE_STEP = 0;
export const SHAPE_RAMP = 1;
export const SHAPE_SINE = 2;
export const SHAPE_PULSE = 3;

export interface SourceParams {
  shape: number;
  amplitude: number;
  start: number;
  offset: number;
  omega: number;
  width: number;
  period: number;
}

export function sourceValue(s: SourceParams, t: number, piece: number): number {
  if (piece < s.start) return s.offset;
  switch (s.shape) {
    case SHAPE_STEP:
      return s.offset + s.amplitude;
    case SHAPE_RAMP:
      return s.offset + s.amplitude * (t - s.start);
    case SHAPE_SINE:
      return s.offset + s.amplitude * Math.sin(s.omega * (t - s.start));
    default: {
      const phase = (piece - s.start) % s.period;
      return s.offset + (phase < s.width ? s.amplitude : 0);
    }
  }
}

/**
 * The first time after `after` (by more than `tol`) where the waveform or its slope jumps, or
 * Infinity. Edges are generated one at a time from their formula (start + k·period, no
 * accumulated sums), so a pulse train of any length costs nothing in advance and has no cap.
 */
export function nextSourceEdge(s: SourceParams, after: number, tol: number): number {
  const past = (e: number) => e > after + tol;
  // a pulse at least as wide as its period is a step
  if (s.shape !== SHAPE_PULSE || s.width >= s.period) return s.start > 0 && past(s.start) ? s.start : Infinity;
  if (past(s.start)) return s.start > 0 ? s.start : firstAfterStart(s, after, tol);
  return firstAfterStart(s, after, tol);
}

function firstAfterStart(s: SourceParams, after: number, tol: number): number {
  const k0 = Math.max(0, Math.floor((after - s.start) / s.period) - 1);
  for (let k = k0; k < k0 + 4; k++) {
    const rise = s.start + k * s.period;
    if (rise > 0 && rise > after + tol) return rise;
    const fall = rise + s.width;
    if (fall > 0 && fall > after + tol) return fall;
  }
  return Infinity;
}

export function shapeCode(shape: string): number {
  switch (shape) {
    case 'ramp':
      return SHAPE_RAMP;
    case 'sinusoid':
      return SHAPE_SINE;
    case 'pulse':
      return SHAPE_PULSE;
    default:
      return SHAPE_STEP;
  }
}
