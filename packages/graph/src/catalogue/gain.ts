import { term } from './card-text.ts';
import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import { samplingParams } from './sampling.ts';
import { defineBlock } from './types.ts';

export const gainSpec = defineBlock({
  kind: 'gain',
  title: 'Gain',
  description: 'Multiplies its input by a constant k.',
  category: 'linear',
  idPrefix: 'gain',
  params: [{ name: 'k', label: 'Gain k', type: 'number', default: 1, description: 'Output = k · input' }, ...samplingParams('gain')],
  card: (p) => ({ formula: typeof p.k === 'string' && p.k.trim() ? p.k : (term(p.k) ?? '?') }),
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({ type: 'transfer', tf: tfOf([finite(p, 'k')], [1]) }),
});
