import { limitEvent, limitFire, limitGuards, limitMode } from './limits.ts';
import { defineOp } from './node.ts';
import type { Builder } from './registry-types.ts';

export const AW_OFF = 0;
export const AW_BACK = 1;
export const AW_CONDITIONAL = 2;

/**
 * PID with derivative filter and optional output limits:
 * v = kp·e + I + kdTf·(e − z), İ = ki·e (+ anti-windup), ż = (e − z)/tf; the output is v
 * limited to [umin, umax] (modes below / linear / above, as a saturation on v).
 * Anti-windup: back-calculation adds (u − v)/Tt to İ; conditional integration holds I while
 * the output is at a limit and the error drives it further into the limit (guard slot 2).
 */
export const pidOp = defineOp({
  name: 'pid',
  output: (nd, _t, x, sig) => {
    const e = sig[nd.in0];
    let v = nd.kp * e + x[nd.so];
    if (nd.hasD) v += nd.kdTf * (e - x[nd.so + 1]);
    nd.v = v;
    return nd.mode === 0 ? v : nd.mode > 0 ? nd.hi : nd.lo;
  },
  derivative: (nd, x, sig, dx) => {
    const so = nd.so;
    const e = sig[nd.in0];
    let di = nd.ki * e;
    if (nd.aw === AW_BACK) di += (sig[nd.self] - nd.v) / nd.tt;
    else if (nd.aw === AW_CONDITIONAL && nd.frozen) di = 0;
    dx[so] = di;
    if (nd.hasD) dx[so + 1] = (e - x[so + 1]) / nd.tf;
  },
  guards: (nd, _x, sig, _udot, g, scale) => {
    limitGuards(nd, nd.v, g, scale);
    if (nd.ng > 2) {
      const o = nd.go + 2;
      if (nd.mode === 0) g[o] = Infinity;
      else {
        // conditional integration: holding is right while the error pushes into the limit
        const p = nd.mode * Math.sign(nd.ki) * sig[nd.in0];
        g[o] = nd.frozen ? p : -p;
      }
    }
  },
  choose: (nd, _x, sig) => {
    const old = nd.mode;
    const m = limitMode(nd, nd.v);
    let changed = false;
    if (m !== old) {
      nd.mode = m;
      if (m === 0) nd.frozen = false;
      changed = true;
    }
    if (nd.aw === AW_CONDITIONAL && nd.mode !== 0) {
      const e = sig[nd.in0];
      const p = nd.mode * Math.sign(nd.ki) * e;
      const pe = 1e-12 * (1 + Math.abs(e));
      const f = p > pe ? true : p < -pe ? false : nd.frozen || old === 0;
      if (f !== nd.frozen) {
        nd.frozen = f;
        changed = true;
      }
    }
    return changed;
  },
  fire: (nd, slot, _x, sig) => {
    if (slot === 2) return { mode: nd.mode, frozen: !nd.frozen };
    const mode = limitFire(nd, slot);
    let frozen = false;
    if (mode !== 0 && nd.aw === AW_CONDITIONAL) frozen = mode * Math.sign(nd.ki) * sig[nd.in0] > 0;
    return { mode, frozen };
  },
  eventKind: limitEvent,
  actuator: true,
});

export const buildPid: Builder = (cb, p, ctx) => {
  ctx.checkLinearForm(); // validates form, gains and limits
  const nd = ctx.add(pidOp, cb);
  const kp = Number(p.kp);
  const n = Number(p.n);
  let ki: number;
  let kd: number;
  if (p.form === 'parallel') {
    ki = Number(p.ki);
    kd = Number(p.kd);
  } else {
    const ti = Number(p.ti);
    ki = Number.isFinite(ti) ? kp / ti : 0;
    kd = kp * Number(p.td);
  }
  nd.kp = kp;
  nd.ki = ki;
  if (kd !== 0) {
    nd.hasD = true;
    nd.tf = kd / kp / n;
    nd.kdTf = kd / nd.tf;
  }
  ctx.states(nd, nd.hasD ? 2 : 1);
  nd.feedthrough = nd.kp + nd.kdTf !== 0;
  nd.tt = Number(p.tt);
  if (!ctx.linear) {
    nd.lo = Number(p.umin);
    nd.hi = Number(p.umax);
    const limited = Number.isFinite(nd.lo) || Number.isFinite(nd.hi);
    const aw = String(p.antiWindup);
    nd.aw = !limited || ki === 0 ? AW_OFF : aw === 'back-calculation' ? AW_BACK : aw === 'conditional' ? AW_CONDITIONAL : AW_OFF;
    if (limited) nd.ng = nd.aw === AW_CONDITIONAL ? 3 : 2;
  }
  ctx.wire(nd, cb.inputs);
};
