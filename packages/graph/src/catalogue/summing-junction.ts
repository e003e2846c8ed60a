import { InputError } from '@loopwright/lti';
import { defineBlock } from './types.ts';

/** Most inputs one junction may have (keeps the canvas readable; chain junctions for more). */
export const MAX_SUM_INPUTS = 16;
export const SIGNS_PATTERN = /^[+-]{1,16}$/;

export function sumSigns(signs: unknown): number[] {
  const text = typeof signs === 'string' ? signs : '+-';
  if (!SIGNS_PATTERN.test(text)) {
    throw new InputError(`field signs: "${text}" must be 1 to ${MAX_SUM_INPUTS} characters, each + or -`, { field: 'signs' });
  }
  return [...text].map((c) => (c === '+' ? 1 : -1));
}

export const summingJunctionSpec = defineBlock({
  kind: 'summing-junction',
  title: 'Summing junction',
  description: 'Adds its inputs in1..inN with the signs given in order, e.g. "+-" is in1 − in2 (reference minus feedback).',
  category: 'linear',
  idPrefix: 'sum',
  params: [
    {
      name: 'signs',
      label: 'Signs',
      type: 'text',
      default: '+-',
      pattern: SIGNS_PATTERN,
      patternHint: `1 to ${MAX_SUM_INPUTS} characters, each + or -, one per input (e.g. "+-")`,
    },
  ],
  card: () => ({}),
  inputs: (p) => {
    const text = typeof p.signs === 'string' && SIGNS_PATTERN.test(p.signs) ? p.signs : '+-';
    return [...text].map((_, i) => `in${i + 1}`);
  },
  outputs: ['out'],
  linear: (p) => ({ type: 'sum', signs: sumSigns(p.signs) }),
});
