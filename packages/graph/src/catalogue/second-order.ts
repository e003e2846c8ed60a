import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import type { BlockSpec } from './types.ts';

export const secondOrderSpec: BlockSpec = {
  kind: 'second-order',
  title: 'Second-order',
  description: 'k·wn²/(s² + 2·zeta·wn·s + wn²): static gain k, natural frequency wn, damping ratio zeta.',
  category: 'linear',
  params: [
    { name: 'k', label: 'Static gain k', type: 'number', default: 1 },
    { name: 'wn', label: 'Natural frequency wn', unit: 'rad/s', type: 'number', default: 1, min: 0, exclusiveMin: true, max: 1e6 },
    { name: 'zeta', label: 'Damping ratio zeta', type: 'number', default: 0.7, min: 0, max: 100 },
  ],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => {
    const k = finite(p, 'k');
    const wn = finite(p, 'wn');
    const zeta = finite(p, 'zeta');
    return { type: 'transfer', tf: tfOf([k * wn * wn], [wn * wn, 2 * zeta * wn, 1]) };
  },
};
