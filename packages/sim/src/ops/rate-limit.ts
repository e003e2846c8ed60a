import { nonlinearNode } from './linear.ts';
import { defineOp } from './node.ts';
import type { Builder } from './registry-types.ts';

/**
 * Rate limit: the output follows the input while its slope is within [−falling, rising]
 * (mode 0, tracking: the state is not integrated and is kept equal to the input), and slews at
 * the limit otherwise (mode +1 rising, −1 falling: the state integrates the limit). Leaving
 * tracking is the input slope crossing a limit; leaving a slew is the output meeting the input.
 */
export const rateLimitOp = defineOp({
  name: 'rate-limit',
  output: (nd, _t, x, sig) => (nd.mode === 0 ? sig[nd.in0] : x[nd.so]),
  derivative: (nd, _x, _sig, dx) => {
    dx[nd.so] = nd.mode === 0 ? 0 : nd.mode > 0 ? nd.rising : -nd.falling;
  },
  guards: (nd, x, sig, udot, g, scale) => {
    const o = nd.go;
    const u = sig[nd.in0];
    scale[o] = scale[o + 1] = 1 + Math.abs(u);
    if (nd.mode === 0) {
      const s = udot[nd.in0];
      g[o] = nd.rising - s;
      g[o + 1] = s + nd.falling;
    } else {
      const r = x[nd.so];
      g[o] = nd.mode > 0 ? u - r : r - u;
      g[o + 1] = Infinity;
    }
  },
  readsSlope: true,
  needsSlope: (nd) => nd.mode === 0,
  choose: (nd, x, sig, udot, modes) => {
    const u = sig[nd.in0];
    const r = x[nd.so];
    const eps = 1e-9 * (1 + Math.abs(u));
    let m: number;
    if (Math.abs(u - r) > eps)
      m = u > r ? 1 : -1; // behind the input: slew towards it
    else if (modes.inDwell && nd.mode !== 0) m = nd.mode;
    else {
      // on the input: follow it unless its slope is beyond a limit; a slope within a hair of the
      // limit stays tracking (its guard then fires if it really crosses)
      const s = udot[nd.in0];
      m = s > nd.rising + 1e-7 * (1 + nd.rising) ? 1 : s < -nd.falling - 1e-7 * (1 + nd.falling) ? -1 : 0;
      if (m !== 0) x[nd.so] = u;
    }
    if (m === nd.mode) return false;
    nd.mode = m;
    return true;
  },
  fire: (nd, slot, x, sig, modes) => {
    if (nd.mode === 0) {
      x[nd.so] = sig[nd.in0];
      return { mode: slot === 0 ? 1 : -1, frozen: false };
    }
    // in a dwell keep slewing: its slope is the limit itself
    return { mode: modes.inDwell ? nd.mode : 0, frozen: false };
  },
  jump: (nd, x, sig) => {
    // a jump of the input (at a segment start) cannot be followed
    if (nd.mode !== 0) return nd.mode;
    const u = sig[nd.in0];
    const r = x[nd.so];
    const eps = 1e-9 * (1 + Math.abs(u));
    return u > r + eps ? 1 : u < r - eps ? -1 : 0;
  },
  sync: (nd, x, sig) => {
    if (nd.mode === 0) x[nd.so] = sig[nd.in0];
  },
  eventKind: (_nd, m) => (m > 0 ? 'rate-rising' : m < 0 ? 'rate-falling' : 'rate-leave'),
  actuator: true,
});

export const buildRateLimit: Builder = (cb, p, ctx) => {
  const nd = nonlinearNode(rateLimitOp, cb, ctx);
  if (!nd) return;
  nd.rising = Number(p.rising);
  nd.falling = Number(p.falling);
  ctx.states(nd, 1);
  nd.ng = 2;
};
