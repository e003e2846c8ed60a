import type { BlockSpec } from './types.ts';

export const SOURCE_SHAPES = ['step', 'ramp', 'sinusoid', 'pulse'] as const;

export const sourceSpec: BlockSpec = {
  kind: 'source',
  title: 'Source',
  description:
    'An input signal: step (amplitude from `start`), ramp (slope = amplitude per second), sinusoid ' +
    '(amplitude·sin(omega·(t − start))) or pulse train (width, period), each added to `offset`. ' +
    'In analysis it is the injection point of a closed-loop transfer function.',
  category: 'signal',
  params: [
    { name: 'shape', label: 'Shape', type: 'choice', default: 'step', choices: SOURCE_SHAPES },
    { name: 'amplitude', label: 'Amplitude', type: 'number', default: 1 },
    { name: 'start', label: 'Start time', unit: 's', type: 'number', default: 0, min: 0, max: 1e9 },
    { name: 'offset', label: 'Offset', type: 'number', default: 0 },
    { name: 'omega', label: 'Angular frequency', unit: 'rad/s', type: 'number', default: 1, min: 0, exclusiveMin: true, max: 1e9 },
    { name: 'width', label: 'Pulse width', unit: 's', type: 'number', default: 1, min: 0, exclusiveMin: true, max: 1e9 },
    { name: 'period', label: 'Pulse period', unit: 's', type: 'number', default: 2, min: 0, exclusiveMin: true, max: 1e9 },
  ],
  inputs: () => [],
  outputs: ['out'],
  linear: () => ({ type: 'source' }),
};
