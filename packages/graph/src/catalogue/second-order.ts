import { term, times } from './card-text.ts';
import { finite, singleInput, singleOutput, tfOf } from './common.ts';
import { defineBlock } from './types.ts';

export const secondOrderSpec = defineBlock({
  kind: 'second-order',
  title: 'Second-order',
  description: 'k·wn²/(s² + 2·zeta·wn·s + wn²): static gain k, natural frequency wn, damping ratio zeta.',
  category: 'linear',
  idPrefix: 'so',
  params: [
    { name: 'k', label: 'Static gain k', type: 'number', default: 1 },
    { name: 'wn', label: 'Natural frequency wn', unit: 'rad/s', type: 'number', default: 1, min: 0, exclusiveMin: true, max: 1e6 },
    { name: 'zeta', label: 'Damping ratio zeta', type: 'number', default: 0.7, min: 0, max: 100 },
  ],
  card: (p) => {
    const wn = term(p.wn) ?? 'wn';
    const z = term(p.zeta) ?? 'zeta';
    return { formula: `${times(term(p.k), `${wn}^2`)}/(s^2 + 2*${z}*${wn}*s + ${wn}^2)` };
  },
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => {
    const k = finite(p, 'k');
    const wn = finite(p, 'wn');
    const zeta = finite(p, 'zeta');
    return { type: 'transfer', tf: tfOf([k * wn * wn], [wn * wn, 2 * zeta * wn, 1]) };
  },
});
