import { term, times } from './card-text.ts';
import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import { defineBlock } from './types.ts';

export const firstOrderLagSpec = defineBlock({
  kind: 'first-order-lag',
  title: 'First-order lag',
  description: 'k/(tau·s + 1): static gain k, time constant tau (tau = 0 gives a pure gain).',
  category: 'linear',
  idPrefix: 'lag',
  params: [
    { name: 'k', label: 'Static gain k', type: 'number', default: 1 },
    { name: 'tau', label: 'Time constant tau', unit: 's', type: 'number', default: 1, min: 0, max: 1e6 },
  ],
  card: (p) => ({ formula: `${term(p.k) ?? '1'}/(${times(term(p.tau), 's')} + 1)` }),
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({ type: 'transfer', tf: tfOf([finite(p, 'k')], [1, finite(p, 'tau')]) }),
});
