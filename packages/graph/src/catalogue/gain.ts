import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import { samplingParams } from './sampling.ts';
import type { BlockSpec } from './types.ts';

export const gainSpec: BlockSpec = {
  kind: 'gain',
  title: 'Gain',
  description: 'Multiplies its input by a constant k.',
  category: 'linear',
  params: [{ name: 'k', label: 'Gain k', type: 'number', default: 1, description: 'Output = k · input' }, ...samplingParams('gain')],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({ type: 'transfer', tf: tfOf([finite(p, 'k')], [1]) }),
};
