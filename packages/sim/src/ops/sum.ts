import { defineOp } from './node.ts';
import type { Builder } from './registry-types.ts';

/** Summing junction: Σ sign_i·u_i. */
export const sumOp = defineOp({
  name: 'sum',
  output: (nd, _t, _x, sig) => {
    const ins = nd.ins;
    const signs = nd.signs;
    let y = 0;
    for (let j = 0; j < ins.length; j++) y += signs[j] * sig[ins[j]];
    return y;
  },
});

export const buildSum: Builder = (cb, p, ctx) => {
  const nd = ctx.add(sumOp, cb);
  const signs = [...String(p.signs)].map((c) => (c === '-' ? -1 : 1));
  nd.signs = Float64Array.from(signs);
  nd.ins = new Int32Array(signs.length);
  nd.feedthrough = true;
  ctx.wire(nd, cb.inputs);
};
