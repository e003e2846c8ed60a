import { limitEvent, limitFire, limitGuards, limitMode } from './limits.ts';
import { defineOp, type SimNode } from './node.ts';
import type { Builder } from './registry-types.ts';
import { nonlinearNode } from './linear.ts';

/** Saturation: y = u inside [lower, upper], the limit outside (modes below / linear / above). */
export const saturationOp = defineOp({
  name: 'saturation',
  output: (nd, _t, _x, sig) => (nd.mode === 0 ? sig[nd.in0] : nd.mode > 0 ? nd.hi : nd.lo),
  guards: (nd, _x, sig, _udot, g, scale) => limitGuards(nd, sig[nd.in0], g, scale),
  choose: (nd, _x, sig) => setMode(nd, limitMode(nd, sig[nd.in0])),
  fire: (nd, slot) => ({ mode: limitFire(nd, slot), frozen: false }),
  eventKind: limitEvent,
  actuator: true,
});

function setMode(nd: SimNode, m: number): boolean {
  if (m === nd.mode) return false;
  nd.mode = m;
  return true;
}

export const buildSaturation: Builder = (cb, p, ctx) => {
  const nd = nonlinearNode(saturationOp, cb, ctx);
  if (!nd) return;
  nd.lo = Number(p.lower);
  nd.hi = Number(p.upper);
  if (Number.isFinite(nd.lo) || Number.isFinite(nd.hi)) nd.ng = 2;
};
