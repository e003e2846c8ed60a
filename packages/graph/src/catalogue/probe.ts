import { defineBlock } from './types.ts';

/** A unit: up to 16 characters, no line breaks (it labels a chart axis). */
export const UNIT_PATTERN = /^[^\n\r]{0,16}$/;

export const probeSpec = defineBlock({
  kind: 'probe',
  title: 'Probe',
  description: 'Records the signal on its input as a trace; in analysis it is a measurement point.',
  category: 'signal',
  idPrefix: 'probe',
  params: [
    {
      name: 'unit',
      label: 'Unit',
      type: 'text',
      default: '',
      pattern: UNIT_PATTERN,
      patternHint: 'a unit of up to 16 characters, e.g. "rad/s"',
      description: 'The unit of the measured signal; the Response view draws probes of one unit on a shared axis.',
    },
  ],
  card: (p) => ({ caption: typeof p.unit === 'string' && p.unit ? `measured signal (${p.unit})` : 'measured signal' }),
  inputs: () => ['in'],
  outputs: [],
  linear: () => ({ type: 'probe' }),
});
