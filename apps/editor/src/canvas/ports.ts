/**
 * Which side of its block an input enters. Block cards take every input on the left; a summing
 * junction takes its first input from the left, the second from below and the third from above
 * (the textbook drawing: reference in from the left, feedback up from underneath), further
 * ones on the left again. The canvas, the wire lanes and Tidy all follow this one rule.
 */
import type { BlockKind } from '../store/graph-bridge.ts';

export type InputSide = 'left' | 'bottom' | 'top';

export function inputSide(kind: BlockKind, index: number): InputSide {
  if (kind !== 'summing-junction') return 'left';
  if (index === 1) return 'bottom';
  if (index === 2) return 'top';
  return 'left';
}
