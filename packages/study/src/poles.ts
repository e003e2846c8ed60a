/**
 * Closed-loop poles of the whole diagram, each marked with how it was found. With a dead time
 * inside a loop the poles are those of a Padé approximant; a pole that stays put when the
 * order is raised by two approximates a true root of the characteristic equation, one that
 * moves belongs to the approximation (often far out, e.g. −4.5e4 ± 4e4j for a 0.1 ms delay)
 * and is marked so that no view or report passes it off as a property of the plant.
 */
import { DEFAULT_PADE_ORDER, type Diagram } from '@loopwright/graph';
import { MAX_PADE_ORDER, cabs, polyRoots, type Complex } from '@loopwright/lti';
import { characteristicAt, without } from './split.ts';
import { engineParameterName, withLiveValue } from './sweep-target.ts';
import type { Cx, LiveValue, PoleOrigin, PolesData } from './types.ts';
import { assertAnalysable } from './validate.ts';

export interface PolesRequest {
  /** Values of named parameters that replace the diagram's (CLI --set). */
  overrides?: Record<string, number>;
  /** A value held for a sweep target (the live slider value). */
  live?: LiveValue | null;
  padeOrder?: number;
  /** false: recompute in full at the live value (the check of the precomputed path). */
  affine?: boolean;
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
  const swept = req.live && req.affine !== false ? engineParameterName(req.live.target) : undefined;
  const main = characteristicAt(diagram, overrides, order, swept, deadline);
  const poles = polyRoots(main.poly);
  const origin =
    main.handling.mode === 'pade'
      ? padeOrigins(poles, polyRoots(characteristicAt(diagram, overrides, comparisonOrder(order), swept, deadline).poly))
      : poles.map((): PoleOrigin => 'exact');
  return {
    poles: poles.map(plain),
    origin,
    delayHandling: main.handling,
    stable: stableFrom(poles),
    sweepPath: main.affine ? 'affine' : 'full',
  };
}

/** The Padé order a result is compared at to mark its roots: two higher, or two lower at the top order. */
export const comparisonOrder = (order: number): number => (order + 2 <= MAX_PADE_ORDER ? order + 2 : Math.max(1, order - 2));

/**
 * How each root found with a Padé approximant relates to the true ones: 'approximated' when a
 * root of the same problem at a Padé order two higher lies within 1 % of it (it approximates a
 * true root), else 'approximant' (it belongs to the approximation). `higher`: those roots.
 */
export function padeOrigins(roots: readonly Complex[], higher: readonly Complex[]): PoleOrigin[] {
  const scale = Math.max(0, ...roots.map(cabs));
  return roots.map((p) => {
    const near = Math.min(Infinity, ...higher.map((q) => Math.hypot(p.re - q.re, p.im - q.im)));
    return near <= AGREE * Math.max(cabs(p), 1e-9 * scale) ? 'approximated' : 'approximant';
  });
}

/** Origins of roots that involve no approximation unless `pade` (then compared with `higher()`, computed only then). */
export function originsOf(roots: readonly Complex[], pade: boolean, higher: () => readonly Complex[]): PoleOrigin[] {
  return pade ? padeOrigins(roots, higher()) : roots.map((): PoleOrigin => 'exact');
}

/** The origin of the root nearest `at` (a departure angle's pole, an arrival angle's zero). */
export function originAt(at: Cx, roots: readonly Cx[], origin: readonly PoleOrigin[]): PoleOrigin {
  let best = -1;
  let dist = Infinity;
  roots.forEach((r, i) => {
    const d = Math.hypot(r.re - at.re, r.im - at.im);
    if (d < dist) {
      dist = d;
      best = i;
    }
  });
  return best < 0 ? 'exact' : (origin[best] ?? 'exact');
}
