import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import { samplingParams } from './sampling.ts';
import type { BlockSpec } from './types.ts';

export const leadLagSpec: BlockSpec = {
  kind: 'lead-lag',
  title: 'Lead–lag',
  description: 'k·(tLead·s + 1)/(tLag·s + 1): phase lead where tLead > tLag, lag where tLead < tLag.',
  category: 'linear',
  params: [
    { name: 'k', label: 'Gain k', type: 'number', default: 1 },
    { name: 'tLead', label: 'Lead time tLead', unit: 's', type: 'number', default: 1, min: 0, max: 1e6 },
    { name: 'tLag', label: 'Lag time tLag', unit: 's', type: 'number', default: 0.1, min: 0, max: 1e6 },
    ...samplingParams('lead-lag'),
  ],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({
    type: 'transfer',
    tf: tfOf([finite(p, 'k'), finite(p, 'k') * finite(p, 'tLead')], [1, finite(p, 'tLag')]),
  }),
};
