import { InputError, parseTransferFunction } from '@loopwright/lti';
import { singleInput, singleOutput, stringOf } from './common.ts';
import { samplingParams } from './sampling.ts';
import { defineBlock } from './types.ts';

export const transferFunctionSpec = defineBlock({
  kind: 'transfer-function',
  title: 'Transfer function',
  description:
    'Any rational function of s written as text over the named parameters, e.g. "Kp*(1 + 1/(Ti*s))" ' +
    'or "2*exp(-0.5*s)/(3*s + 1)" (exp(−T·s) is a dead time).',
  category: 'linear',
  idPrefix: 'tf',
  params: [
    {
      name: 'expression',
      label: 'Expression in s',
      type: 'expression',
      default: '1/(s + 1)',
      description: 'Arithmetic, integer powers, numbers, named parameters, s and exp(-T*s).',
    },
    ...samplingParams('transfer-function'),
  ],
  card: (p) => ({ formula: String(p.expression ?? '') }),
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p, scope = {}) => {
    const text = stringOf(p, 'expression');
    if (text.trim() === '') throw new InputError('field expression: is empty', { field: 'expression' });
    try {
      return { type: 'transfer', tf: parseTransferFunction(text, { ...scope }) };
    } catch (err) {
      if (err instanceof InputError) {
        throw new InputError(`field expression: "${text}": ${err.message}`, { ...err.details, field: 'expression' });
      }
      throw err;
    }
  },
});
