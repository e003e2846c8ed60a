import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import type { BlockSpec } from './types.ts';

export const integratorSpec: BlockSpec = {
  kind: 'integrator',
  title: 'Integrator',
  description: 'k/s: the output is k times the running integral of the input.',
  category: 'linear',
  params: [{ name: 'k', label: 'Gain k', unit: '1/s', type: 'number', default: 1 }],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({ type: 'transfer', tf: tfOf([finite(p, 'k')], [0, 1]) }),
};
