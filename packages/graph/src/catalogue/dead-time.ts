import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import type { BlockSpec } from './types.ts';

export const deadTimeSpec: BlockSpec = {
  kind: 'dead-time',
  title: 'Dead time',
  description: 'e^(−delay·s): the output is the input delayed by `delay` seconds.',
  category: 'linear',
  params: [{ name: 'delay', label: 'Dead time', unit: 's', type: 'number', default: 0.1, min: 0, max: 1e6 }],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({ type: 'transfer', tf: tfOf([1], [1], finite(p, 'delay')) }),
};
