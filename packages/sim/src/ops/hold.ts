import { defineOp } from './node.ts';

/** A constant state with no output: a diagram without states still gives the integrator one. */
export const holdOp = defineOp({
  name: 'hold',
  output: () => 0,
  derivative: (nd, _x, _sig, dx) => {
    dx[nd.so] = 0;
  },
});
