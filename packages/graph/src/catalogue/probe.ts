import { defineBlock } from './types.ts';

export const probeSpec = defineBlock({
  kind: 'probe',
  title: 'Probe',
  description: 'Records the signal on its input as a trace; in analysis it is a measurement point.',
  category: 'signal',
  idPrefix: 'probe',
  params: [],
  card: () => ({ caption: 'measured signal' }),
  inputs: () => ['in'],
  outputs: [],
  linear: () => ({ type: 'probe' }),
});
