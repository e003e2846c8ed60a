import type { BlockSpec } from './types.ts';

export const probeSpec: BlockSpec = {
  kind: 'probe',
  title: 'Probe',
  description: 'Records the signal on its input as a trace; in analysis it is a measurement point.',
  category: 'signal',
  params: [],
  inputs: () => ['in'],
  outputs: [],
  linear: () => ({ type: 'probe' }),
};
