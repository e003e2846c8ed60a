import { rconst, transfer } from '@loopwright/lti';
import { numberOf, singleInput, singleOutput } from './common.ts';
import type { BlockSpec } from './types.ts';

export const rateLimitSpec: BlockSpec = {
  kind: 'rate-limit',
  title: 'Rate limit',
  description:
    'Bounds how fast the signal may rise and fall (both positive, units per second; blank = unlimited). ' +
    'Its linear form passes the signal (gain 1).',
  category: 'nonlinear',
  params: [
    { name: 'rising', label: 'Rising rate', unit: '1/s', type: 'number', default: 1, min: 0, exclusiveMin: true, blank: Infinity },
    { name: 'falling', label: 'Falling rate', unit: '1/s', type: 'number', default: 1, min: 0, exclusiveMin: true, blank: Infinity },
  ],
  actuator: {},
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => {
    numberOf(p, 'rising');
    numberOf(p, 'falling');
    return { type: 'transfer', tf: transfer(rconst(1)) };
  },
};
