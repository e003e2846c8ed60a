import { term } from './card-text.ts';
import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import { defineBlock } from './types.ts';

export const deadTimeSpec = defineBlock({
  kind: 'dead-time',
  title: 'Dead time',
  description: 'e^(−delay·s): the output is the input delayed by `delay` seconds.',
  category: 'linear',
  idPrefix: 'delay',
  params: [{ name: 'delay', label: 'Dead time', unit: 's', type: 'number', default: 0.1, min: 0, max: 1e6 }],
  card: (p) => ({ formula: `exp(-${term(p.delay) ?? 'T'}*s)` }),
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({ type: 'transfer', tf: tfOf([1], [1], finite(p, 'delay')) }),
});
