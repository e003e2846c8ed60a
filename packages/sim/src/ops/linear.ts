import { linearFormWithScope } from '@loopwright/graph';
import { InputError, realize } from '@loopwright/lti';
import type { CompiledBlock } from '../compile.ts';
import { buildDelay } from './delay.ts';
import { defineOp, type Op, type SimNode } from './node.ts';
import type { BuildContext, Builder } from './registry-types.ts';

/**
 * A linear block realised in controllable canonical form from its catalogue transfer function:
 * ẋ_j = x_(j+1), ẋ_(n−1) = b·u − Σ a_j x_j, y = Σ c_j x_j + d·u.
 */
export const linearOp = defineOp({
  name: 'linear',
  output: (nd, _t, x, sig) => {
    const so = nd.so;
    const c = nd.c;
    let y = 0;
    for (let j = 0; j < nd.ns; j++) y += c[j] * x[so + j];
    if (nd.d !== 0) y += nd.d * sig[nd.in0];
    return y;
  },
  derivative: (nd, x, sig, dx) => {
    const so = nd.so;
    const n = nd.ns;
    const a = nd.a;
    let acc = nd.b * sig[nd.in0];
    for (let j = 0; j < n; j++) acc -= a[j] * x[so + j];
    for (let j = 0; j < n - 1; j++) dx[so + j] = x[so + j + 1];
    dx[so + n - 1] = acc;
  },
});

/**
 * The node of a static nonlinearity with one input (saturation, dead zone, rate limit): its
 * parameters checked through the catalogue (naming the block), passed straight through in a
 * linear run (null), else a feedthrough node of `op` wired to the block's input.
 */
export function nonlinearNode(op: Op, cb: CompiledBlock, ctx: BuildContext): SimNode | null {
  ctx.checkLinearForm();
  if (ctx.linear) {
    passThrough(cb, ctx);
    return null;
  }
  const nd = ctx.add(op, cb);
  nd.feedthrough = true;
  ctx.wire(nd, cb.inputs);
  return nd;
}

/** A node passing its input straight through (the linear overlay of saturation, rate limit, dead zone). */
export function passThrough(cb: CompiledBlock, ctx: BuildContext): void {
  const nd = ctx.add(linearOp, cb);
  nd.d = 1;
  nd.feedthrough = true;
  ctx.wire(nd, cb.inputs);
}

/**
 * Every block whose catalogue linear form is a transfer function (gain, lags, lead–lag,
 * integrator, second-order, transfer-function expressions, dead time — and any linear kind
 * added to the catalogue later): a dead time, when present, becomes its own node before the
 * realisation.
 */
export const buildLinear: Builder = (cb, _p, ctx) => {
  const form = linearFormWithScope(cb.block, ctx.scope);
  if (form.type !== 'transfer') throw new InputError(`block ${cb.id}: kind ${cb.kind} has no transfer-function form`);
  const tf = form.tf;
  let fromDelay = null;
  if (tf.delay > 0 || cb.kind === 'dead-time') {
    fromDelay = buildDelay(cb, tf.delay, ctx);
    const r = tf.rational;
    if (r.den.length === 1 && r.num.length === 1 && r.num[0] === r.den[0]) return; // a pure dead time
  }
  const ss = realize(tf.rational, `block ${cb.id}`);
  const nd = ctx.add(linearOp, cb);
  ctx.states(nd, ss.A.length);
  nd.a = Float64Array.from(nd.ns > 0 ? ss.A[nd.ns - 1].map((v) => -v) : []);
  // scale the states (x = z/σ) so that they have the size of the output: the integrator's
  // absolute tolerance then means the same for a lag of 1 s and of 10 µs
  const sigma = Math.max(...ss.C.map(Math.abs));
  nd.b = sigma > 0 && Number.isFinite(sigma) ? sigma : 1;
  nd.c = Float64Array.from(ss.C.map((v) => v / nd.b));
  nd.d = ss.D;
  nd.feedthrough = ss.D !== 0;
  if (fromDelay) ctx.wireNode(nd, fromDelay);
  else ctx.wire(nd, cb.inputs);
};
