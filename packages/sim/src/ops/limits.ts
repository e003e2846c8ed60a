import type { SimNode } from './node.ts';

/**
 * Shared by the blocks whose mode is "below / inside / above" a pair of limits: saturation,
 * dead zone and the PID output limits. `u` is the signal compared with the limits.
 */

/** Guards: inside, u − lo and hi − u; at a limit, how far u is beyond it (leaving when it turns negative). */
export function limitGuards(nd: SimNode, u: number, g: Float64Array, scale: Float64Array): void {
  const o = nd.go;
  scale[o] = scale[o + 1] = 1 + Math.abs(u);
  if (nd.mode === 0) {
    g[o] = u - nd.lo;
    g[o + 1] = nd.hi - u;
  } else {
    g[o] = nd.mode > 0 ? u - nd.hi : nd.lo - u;
    g[o + 1] = Infinity;
  }
}

/** The mode for u at a restart: beyond a limit by more than round-off, or still on the limit it was at. */
export function limitMode(nd: SimNode, u: number): number {
  const eps = 1e-9 * (1 + Math.abs(u));
  const old = nd.mode;
  if (u > nd.hi + eps) return 1;
  if (u < nd.lo - eps) return -1;
  if (old === 1 && u >= nd.hi - eps) return 1;
  if (old === -1 && u <= nd.lo + eps) return -1;
  return 0;
}

/** Guard slot 0 fired inside: below the lower limit; slot 1: above the upper; at a limit: back inside. */
export function limitFire(nd: SimNode, slot: number): number {
  if (nd.mode === 0) return slot === 0 ? -1 : 1;
  return 0;
}

export function limitEvent(_nd: SimNode, mode: number): string {
  return mode > 0 ? 'limit-upper' : mode < 0 ? 'limit-lower' : 'limit-leave';
}
