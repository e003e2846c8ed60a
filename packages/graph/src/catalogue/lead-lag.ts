import { term, times } from './card-text.ts';
import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import { samplingParams } from './sampling.ts';
import { defineBlock } from './types.ts';

export const leadLagSpec = defineBlock({
  kind: 'lead-lag',
  title: 'Lead–lag',
  description: 'k·(tLead·s + 1)/(tLag·s + 1): phase lead where tLead > tLag, lag where tLead < tLag.',
  category: 'linear',
  idPrefix: 'leadlag',
  params: [
    { name: 'k', label: 'Gain k', type: 'number', default: 1 },
    { name: 'tLead', label: 'Lead time tLead', unit: 's', type: 'number', default: 1, min: 0, max: 1e6 },
    { name: 'tLag', label: 'Lag time tLag', unit: 's', type: 'number', default: 0.1, min: 0, max: 1e6 },
    ...samplingParams('lead-lag'),
  ],
  card: (p) => ({ formula: times(term(p.k), `(${times(term(p.tLead), 's')} + 1)/(${times(term(p.tLag), 's')} + 1)`) }),
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => ({
    type: 'transfer',
    tf: tfOf([finite(p, 'k'), finite(p, 'k') * finite(p, 'tLead')], [1, finite(p, 'tLag')]),
  }),
});
