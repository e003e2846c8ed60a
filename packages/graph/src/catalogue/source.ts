import { show } from './card-text.ts';
import { defineBlock } from './types.ts';

export const SOURCE_SHAPES = ['step', 'ramp', 'sinusoid', 'pulse'] as const;

export const sourceSpec = defineBlock({
  kind: 'source',
  title: 'Source',
  description:
    'An input signal: step (amplitude from `start`), ramp (slope = amplitude per second), sinusoid ' +
    '(amplitude·sin(omega·(t − start))) or pulse train (width, period), each added to `offset`. ' +
    'In analysis it is the injection point of a closed-loop transfer function.',
  category: 'signal',
  idPrefix: 'src',
  params: [
    { name: 'shape', label: 'Shape', type: 'choice', default: 'step', choices: SOURCE_SHAPES },
    { name: 'amplitude', label: 'Amplitude', type: 'number', default: 1 },
    { name: 'start', label: 'Start time', unit: 's', type: 'number', default: 0, min: 0, max: 1e9 },
    { name: 'offset', label: 'Offset', type: 'number', default: 0 },
    { name: 'omega', label: 'Angular frequency', unit: 'rad/s', type: 'number', default: 1, min: 0, exclusiveMin: true, max: 1e9 },
    { name: 'width', label: 'Pulse width', unit: 's', type: 'number', default: 1, min: 0, exclusiveMin: true, max: 1e9 },
    { name: 'period', label: 'Pulse period', unit: 's', type: 'number', default: 2, min: 0, exclusiveMin: true, max: 1e9 },
  ],
  shows: (field, p) => {
    const shape = p.shape ?? 'step';
    if (field === 'omega') return shape === 'sinusoid';
    if (field === 'width' || field === 'period') return shape === 'pulse';
    return true;
  },
  card: (p) => {
    const shape = String(p.shape ?? 'step');
    const extra = shape === 'sinusoid' ? `, ω ${show(p.omega)} rad/s` : shape === 'pulse' ? `, width ${show(p.width)} s` : '';
    return { caption: `${shape} ${show(p.amplitude)}${extra} at t = ${show(p.start)} s` };
  },
  inputs: () => [],
  outputs: ['out'],
  linear: () => ({ type: 'source' }),
});
