/**
 * Closed-loop poles of the whole diagram, each marked with how it was found. With a dead time
 * inside a loop the poles are those of a Padé approximant; a pole that stays put when the
 * order is raised by two approximates a true root of the characteristic equation, one that
 * moves belongs to the approximation (often far out, e.g. −4.5e4 ± 4e4j for a 0.1 ms delay)
 * and is marked so that no view or report passes it off as a property of the plant.
 */
import { DEFAULT_PADE_ORDER, type Diagram } from '@loopwright/graph';
import { cabs, polyRoots, type Complex } from '@loopwright/lti';
import { characteristicAt, without } from './split.ts';
import { engineParameterName, withLiveValue } from './sweep-target.ts';
import type { LiveValue, PoleOrigin, PolesData } from './types.ts';
import { assertAnalysable } from './validate.ts';

export interface PolesRequest {
  /** Values of named parameters that replace the diagram's (CLI --set). */
  overrides?: Record<string, number>;
  /** A value held for a sweep target (the live slider value). */
  live?: LiveValue | null;
  padeOrder?: number;
}

/** A pole agrees across Padé orders when it moves by less than this fraction of its size. */
const AGREE = 1e-2;

const plain = (c: Complex) => ({ re: c.re, im: c.im });

/** Whole-diagram stability from the poles (the tolerance analyseLoops uses). */
export function stableFrom(poles: readonly Complex[]): boolean {
  const scale = Math.max(1, ...poles.map(cabs));
  return poles.every((p) => p.re < -1e-9 * scale);
}

export function polesStudy(d: Diagram, req: PolesRequest = {}, deadline?: number): PolesData {
  const base = req.overrides ?? {};
  const { diagram, overrides } = withLiveValue(d, base, req.live);
  // Validated at the document's values: a live slider value cannot change the structure.
  assertAnalysable(diagram, req.live ? without(overrides, engineParameterName(req.live.target)) : overrides, deadline);
  const order = req.padeOrder ?? DEFAULT_PADE_ORDER;
  const swept = req.live ? engineParameterName(req.live.target) : undefined;
  const main = characteristicAt(diagram, overrides, order, swept, deadline);
  const poles = polyRoots(main.poly);
  let origin: PoleOrigin[] = poles.map(() => 'exact');
  if (main.handling.mode === 'pade') {
    const other = polyRoots(characteristicAt(diagram, overrides, order + 2, swept, deadline).poly);
    const scale = Math.max(...poles.map(cabs));
    origin = poles.map((p) => {
      const near = Math.min(...other.map((q) => Math.hypot(p.re - q.re, p.im - q.im)));
      return near <= AGREE * Math.max(cabs(p), 1e-9 * scale) ? 'approximated' : 'approximant';
    });
  }
  return { poles: poles.map(plain), origin, delayHandling: main.handling, stable: stableFrom(poles) };
}
