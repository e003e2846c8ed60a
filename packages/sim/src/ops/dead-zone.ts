import { limitFire, limitGuards, limitMode } from './limits.ts';
import { defineOp } from './node.ts';
import type { Builder } from './registry-types.ts';
import { nonlinearNode } from './linear.ts';

/** Dead zone: y = 0 inside [lower, upper], u − edge outside (modes below / band / above). */
export const deadZoneOp = defineOp({
  name: 'dead-zone',
  output: (nd, _t, _x, sig) => {
    const u = sig[nd.in0];
    return nd.mode === 0 ? 0 : nd.mode > 0 ? u - nd.hi : u - nd.lo;
  },
  guards: (nd, _x, sig, _udot, g, scale) => limitGuards(nd, sig[nd.in0], g, scale),
  choose: (nd, _x, sig) => {
    const m = limitMode(nd, sig[nd.in0]);
    if (m === nd.mode) return false;
    nd.mode = m;
    return true;
  },
  fire: (nd, slot) => ({ mode: limitFire(nd, slot), frozen: false }),
  eventKind: (_nd, m) => (m === 0 ? 'dead-zone-enter' : 'dead-zone-leave'),
});

export const buildDeadZone: Builder = (cb, p, ctx) => {
  // the linear overlay uses the catalogue's linear form: gain 1
  const nd = nonlinearNode(deadZoneOp, cb, ctx);
  if (!nd) return;
  nd.lo = Number(p.lower);
  nd.hi = Number(p.upper);
  nd.ng = 2;
};
