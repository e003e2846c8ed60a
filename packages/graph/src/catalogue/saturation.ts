import { show } from './card-text.ts';
import { InputError, rconst, transfer } from '@loopwright/lti';
import { numberOf, singleInput, singleOutput } from './common.ts';
import { defineBlock, type ResolvedParams } from './types.ts';

/** Checks lower < upper (or ≤ where equal limits make sense), naming the block field. */
export function orderedLimits(p: ResolvedParams, lo: string, hi: string, strict: boolean): void {
  const a = numberOf(p, lo);
  const b = numberOf(p, hi);
  if (strict ? !(a < b) : !(a <= b)) {
    throw new InputError(`field ${lo}: ${lo} (${a}) must be ${strict ? 'below' : 'at most'} ${hi} (${b})`, { field: lo });
  }
}

export const saturationSpec = defineBlock({
  kind: 'saturation',
  title: 'Saturation',
  description:
    'Clamps the signal to [lower, upper] (blank = no limit on that side). Its linear form passes the signal (gain 1): ' +
    'analysis assumes the limits are not reached.',
  category: 'nonlinear',
  idPrefix: 'sat',
  params: [
    { name: 'lower', label: 'Lower limit', type: 'number', default: -1, blank: -Infinity },
    { name: 'upper', label: 'Upper limit', type: 'number', default: 1, blank: Infinity },
  ],
  actuator: { lower: 'lower', upper: 'upper' },
  card: (p) => ({ caption: `limits ${show(p.lower)} … ${show(p.upper)}` }),
  icon: [{ d: 'M2 16 H12 L28 4 H38' }],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => {
    orderedLimits(p, 'lower', 'upper', true);
    return { type: 'transfer', tf: transfer(rconst(1)) };
  },
});
