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

/** Times in (0, until) where the waveform or its slope jumps. */
export function sourceBreakpoints(s: SourceParams, until: number, cap = 100000): number[] {
  const out: number[] = [];
  if (s.shape !== SHAPE_PULSE) {
    if (s.start > 0 && s.start < until) out.push(s.start);
    return out;
  }
  for (let k = 0; out.length < cap; k++) {
    const rise = s.start + k * s.period;
    if (rise >= until) break;
    if (rise > 0) out.push(rise);
    const fall = rise + s.width;
    if (s.width < s.period && fall < until) out.push(fall);
  }
  return out;
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
