import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import type { BlockSpec } from './types.ts';

export const firstOrderLagSpec: BlockSpec = {
  kind: 'first-order-lag',
  title: 'First-order lag',
  description: 'k/(tau·s + 1): static gain k, time constant tau (tau = 0 gives a pure gain).',
  category: 'linear',
  params: [
    { name: 'k', label: 'Static gain k', type: 'number', default: 1 },
    { name: 'tau', label: 'Time constant tau', unit: 's', type: 'number', default: 1, min: 0, max: 1e6 },
  ],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({ type: 'transfer', tf: tfOf([finite(p, 'k')], [1, finite(p, 'tau')]) }),
};
