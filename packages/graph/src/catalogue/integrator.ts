import { term } from './card-text.ts';
import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import { defineBlock } from './types.ts';

export const integratorSpec = defineBlock({
  kind: 'integrator',
  title: 'Integrator',
  description: 'k/s: the output is k times the running integral of the input.',
  category: 'linear',
  idPrefix: 'int',
  params: [{ name: 'k', label: 'Gain k', unit: '1/s', type: 'number', default: 1 }],
  card: (p) => ({ formula: `${term(p.k) ?? '1'}/s` }),
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({ type: 'transfer', tf: tfOf([finite(p, 'k')], [0, 1]) }),
});
