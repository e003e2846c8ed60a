import { show } from './card-text.ts';
import { rconst, transfer } from '@loopwright/lti';
import { singleInput, singleOutput } from './common.ts';
import { orderedLimits } from './saturation.ts';
import { defineBlock } from './types.ts';

export const deadZoneSpec = defineBlock({
  kind: 'dead-zone',
  title: 'Dead zone',
  description:
    'Output 0 while lower ≤ input ≤ upper, otherwise input − upper (above) or input − lower (below). ' +
    'Its linear form is gain 1 (the large-signal slope): analysis treats the band as negligible.',
  category: 'nonlinear',
  idPrefix: 'dz',
  params: [
    { name: 'lower', label: 'Lower edge', type: 'number', default: -0.1 },
    { name: 'upper', label: 'Upper edge', type: 'number', default: 0.1 },
  ],
  card: (p) => ({ caption: `zero in ${show(p.lower)} … ${show(p.upper)}` }),
  icon: [{ d: 'M4 18 L14 10 H26 L36 2' }],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => {
    orderedLimits(p, 'lower', 'upper', false);
    return { type: 'transfer', tf: transfer(rconst(1)) };
  },
});
