import { poly, rational, transfer } from '@loopwright/lti';
import type { LinearBlock, LinearGraph, LinearWire } from './linear-graph.ts';

/**
 * Small builders for linear graphs in tests and benches (coefficients highest power first, as
 * textbooks print them).
 */
export const tfBlock = (id: string, numDesc: number[], denDesc: number[] = [1], delay = 0): LinearBlock => ({
  id,
  kind: 'transfer',
  tf: transfer(rational(poly.fromDescending(numDesc), poly.fromDescending(denDesc)), delay),
});
export const sumBlock = (id: string, signs: string): LinearBlock => ({
  id,
  kind: 'sum',
  signs: [...signs].map((c) => (c === '+' ? 1 : -1)),
});
export const sourceBlock = (id: string): LinearBlock => ({ id, kind: 'source' });
export const probeBlock = (id: string): LinearBlock => ({ id, kind: 'probe' });

/** Wires written "a->b" or "a->b.in2"; ids are w1, w2, … in order unless given as "id:a->b". */
export function wires(...specs: string[]): LinearWire[] {
  return specs.map((s, i) => {
    const m = /^(?:(\w+):)?([\w+-]+)->([\w+-]+)(?:\.(\w+))?$/.exec(s);
    if (!m) throw new Error(`bad wire spec ${s}`);
    return { id: m[1] ?? `w${i + 1}`, from: m[2], to: m[3], port: m[4] ?? 'in' };
  });
}

export const graph = (blocks: LinearBlock[], w: LinearWire[]): LinearGraph => ({ blocks, wires: w });

/**
 * A chain of N nested loops (a cascade): r → e1 → C1 → e2 → C2 → … → eN → CN → PN → … → P1,
 * with loop i fed back from P_i's output to e_i. Each plant stage is a first-order lag, each
 * controller a proportional gain.
 */
export function nestedChain(n: number): LinearGraph {
  const blocks: LinearBlock[] = [sourceBlock('r'), probeBlock('y')];
  const ws: string[] = ['r->e1.in1'];
  for (let i = 1; i <= n; i++) {
    blocks.push(sumBlock(`e${i}`, '+-'), tfBlock(`C${i}`, [2 + i]), tfBlock(`P${i}`, [1], [1 / (i + 1), 1]));
    ws.push(`e${i}->C${i}`, `fb${i}:P${i}->e${i}.in2`);
    ws.push(i < n ? `C${i}->e${i + 1}.in1` : `C${i}->P${i}`);
    if (i > 1) ws.push(`P${i}->P${i - 1}`);
  }
  ws.push('P1->y');
  return graph(blocks, wires(...ws));
}
