/**
 * The characteristic polynomial of the whole diagram as D0 + k·N0 when it is affine in the
 * swept value (graph's affineSplit), cached: the locus and the closed-loop poles at every
 * slider position share it, so moving the slider costs a root finding, not a reduction.
 */
import { affineSplit, characteristicPolynomial, type DelayHandling, type Diagram } from '@loopwright/graph';
import { poly } from '@loopwright/lti';
import { Lru, cached } from './cache.ts';
import { registerCache } from './caches.ts';
import { engineText } from './fingerprint.ts';

export interface Split {
  n0: number[];
  d0: number[];
  handling: DelayHandling;
}

const splits = registerCache(new Lru<Split | null>(24));

/** The overrides without the swept parameter (the split is taken at the document's value, so it is the same whatever the slider holds). */
export function without(overrides: Record<string, number>, name: string): Record<string, number> {
  const out = { ...overrides };
  delete out[name];
  return out;
}

/** D0 + k·N0 for `name` (null when the polynomial is not affine in it, or either part vanishes). */
export function splitOf(d: Diagram, name: string, overrides: Record<string, number>, padeOrder: number, deadline?: number): Split | null {
  const rest = without(overrides, name);
  return cached(splits, `${engineText(d)}|${name}|${JSON.stringify(rest)}|${padeOrder}`, () => {
    const s = affineSplit(d, name, rest, { padeOrder, ...(deadline !== undefined ? { deadline } : {}) });
    if (!s || poly.isZero(s.n0) || poly.isZero(s.d0)) return null;
    return { n0: s.n0, d0: s.d0, handling: s.handling };
  });
}

/** The characteristic polynomial with `overrides` in force; through the split when `swept` names an affine parameter. */
export function characteristicAt(
  d: Diagram,
  overrides: Record<string, number>,
  padeOrder: number,
  swept?: string,
  deadline?: number,
): { poly: number[]; handling: DelayHandling; affine: boolean } {
  if (swept !== undefined && overrides[swept] !== undefined) {
    const s = splitOf(d, swept, overrides, padeOrder, deadline);
    if (s) return { poly: poly.add(s.d0, poly.scale(s.n0, overrides[swept])), handling: s.handling, affine: true };
  }
  return { ...characteristicPolynomial(d, overrides, { padeOrder, ...(deadline !== undefined ? { deadline } : {}) }), affine: false };
}
