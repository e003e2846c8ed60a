import { show } from './card-text.ts';
import { rconst, transfer } from '@loopwright/lti';
import { numberOf, singleInput, singleOutput } from './common.ts';
import { defineBlock } from './types.ts';

export const rateLimitSpec = defineBlock({
  kind: 'rate-limit',
  title: 'Rate limit',
  description:
    'Bounds how fast the signal may rise and fall (both positive, units per second; blank = unlimited). ' +
    'Its linear form passes the signal (gain 1).',
  category: 'nonlinear',
  idPrefix: 'rate',
  params: [
    { name: 'rising', label: 'Rising rate', unit: '1/s', type: 'number', default: 1, min: 0, exclusiveMin: true, blank: Infinity },
    { name: 'falling', label: 'Falling rate', unit: '1/s', type: 'number', default: 1, min: 0, exclusiveMin: true, blank: Infinity },
  ],
  actuator: {},
  card: (p) => ({ caption: `rise ≤ ${show(p.rising)}/s, fall ≤ ${show(p.falling)}/s` }),
  icon: [{ d: 'M2 16 H10 L30 4 H38' }, { d: 'M10 16 V4 H30', ghost: true }],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => {
    numberOf(p, 'rising');
    numberOf(p, 'falling');
    return { type: 'transfer', tf: transfer(rconst(1)) };
  },
});
