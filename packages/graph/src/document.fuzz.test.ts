import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '@loopwright/lti';
import { checkStructure } from './checks/structure.ts';
import { parseDiagram, serializeDiagram } from './document.ts';
import { demoDiagrams } from './demos/index.ts';

/**
 * Fuzz: mutated documents (fields removed or renamed, wrong types, dangling and cyclic wires,
 * huge numbers, object-internal keys) either load — and then the structural checks run and
 * saving round-trips — or are refused with an InputError naming what is wrong. Nothing else
 * may escape, no run may take a second, and Object.prototype must stay clean.
 */

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };
type Path = (string | number)[];

function paths(root: Json): Path[] {
  const out: Path[] = [];
  const walk = (node: Json, path: Path) => {
    if (Array.isArray(node)) node.forEach((c, i) => (out.push([...path, i]), walk(c, [...path, i])));
    else if (node && typeof node === 'object')
      for (const k of Object.keys(node)) {
        out.push([...path, k]);
        walk(node[k], [...path, k]);
      }
  };
  walk(root, []);
  return out;
}
const parentOf = (root: Json, path: Path): any => path.slice(0, -1).reduce((n: any, k) => (n == null ? n : n[k]), root);

const weird = fc.oneof(
  fc.constantFrom(
    null,
    true,
    false,
    0,
    -1,
    1e308,
    -1e308,
    5e-324,
    2 ** 53 + 1,
    '',
    ' ',
    'Kp*',
    '1/(s+',
    '__proto__',
    'exp(-s)',
    '+-+-+-+-+-+-+-+-+-',
    [],
    {},
  ),
  fc.integer(),
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  fc.string({ maxLength: 12 }),
  fc.jsonValue({ maxDepth: 2 }),
);

const mutation = fc.oneof(
  fc.record({ op: fc.constant('remove' as const), at: fc.nat() }),
  fc.record({ op: fc.constant('set' as const), at: fc.nat(), value: weird }),
  fc.record({ op: fc.constant('rename' as const), at: fc.nat(), key: fc.string({ maxLength: 8 }) }),
  fc.record({ op: fc.constant('proto' as const), at: fc.nat(), key: fc.constantFrom('__proto__', 'constructor', 'prototype') }),
  fc.record({ op: fc.constant('dangling' as const), at: fc.nat(), name: fc.string({ maxLength: 8 }) }),
  fc.record({ op: fc.constant('cycle' as const), a: fc.nat(), b: fc.nat(), port: fc.constantFrom('in', 'in1', 'in2', 'in3', 'out') }),
  fc.record({ op: fc.constant('duplicate' as const), at: fc.nat() }),
);
type Mutation = typeof mutation extends fc.Arbitrary<infer T> ? T : never;

function apply(doc: any, m: Mutation): void {
  if (m.op === 'cycle' || m.op === 'dangling' || m.op === 'duplicate') {
    const blocks = Array.isArray(doc.blocks) ? doc.blocks : [];
    const wires = Array.isArray(doc.wires) ? doc.wires : null;
    if (!wires || blocks.length === 0) return;
    if (m.op === 'cycle') {
      const a = blocks[m.a % blocks.length]?.id;
      const b = blocks[m.b % blocks.length]?.id;
      wires.push({ id: `fz${wires.length}`, from: { block: a, port: 'out' }, to: { block: b, port: m.port } });
    } else if (m.op === 'dangling') {
      const w = wires[m.at % Math.max(1, wires.length)];
      if (w && typeof w === 'object' && w.to && typeof w.to === 'object') w.to.block = m.name;
    } else {
      const b = blocks[m.at % blocks.length];
      blocks.push(structuredClone(b));
    }
    return;
  }
  const all = paths(doc);
  if (all.length === 0) return;
  const path = all[m.at % all.length];
  const parent = parentOf(doc, path);
  const key = path[path.length - 1];
  if (parent == null || typeof parent !== 'object') return;
  switch (m.op) {
    case 'remove':
      if (Array.isArray(parent)) parent.splice(key as number, 1);
      else delete parent[key];
      break;
    case 'set':
      parent[key] = structuredClone(m.value);
      break;
    case 'rename':
      if (!Array.isArray(parent)) {
        const v = parent[key];
        delete parent[key];
        Object.defineProperty(parent, m.key, { value: v, enumerable: true, configurable: true, writable: true });
      }
      break;
    case 'proto': {
      // as JSON.parse would create it: an own property, never the prototype
      const target = Array.isArray(parent) ? parent[key as number] : parent;
      if (target && typeof target === 'object' && !Array.isArray(target)) {
        Object.defineProperty(target, m.key, {
          value: { polluted: 'yes', prototype: { polluted: 'yes' } },
          enumerable: true,
          configurable: true,
          writable: true,
        });
      }
      break;
    }
  }
}

// Mostly a small loop (cheap, so 10,000 runs stay within seconds), sometimes a full demo.
const smallLoop = JSON.stringify({
  format: 'loopwright.diagram',
  version: 3,
  title: 'loop',
  description: '',
  parameters: [{ name: 'Kp', value: 2, unit: '1', min: 0, max: 10, scale: 'linear' }],
  blocks: [
    { id: 'r', kind: 'source', position: { x: 0, y: 0 }, params: { shape: 'step', amplitude: 1 } },
    { id: 'e', kind: 'summing-junction', position: { x: 180, y: 0 }, params: { signs: '+-' } },
    { id: 'c', kind: 'pid', position: { x: 360, y: 0 }, params: { kp: 'Kp', ti: 2, umin: '', umax: 5 } },
    { id: 'g', kind: 'transfer-function', position: { x: 540, y: 0 }, params: { expression: 'exp(-0.1*s)/(s*(s+1))' } },
    { id: 'y', kind: 'probe', position: { x: 720, y: 0 }, params: {} },
  ],
  wires: [
    { id: 'w1', from: { block: 'r', port: 'out' }, to: { block: 'e', port: 'in1' } },
    { id: 'w2', from: { block: 'e', port: 'out' }, to: { block: 'c', port: 'in' } },
    { id: 'w3', from: { block: 'c', port: 'out' }, to: { block: 'g', port: 'in' } },
    { id: 'w4', from: { block: 'g', port: 'out' }, to: { block: 'y', port: 'in' } },
    { id: 'w5', from: { block: 'g', port: 'out' }, to: { block: 'e', port: 'in2' } },
  ],
  cuts: [{ id: 'k1', wire: 'w5' }],
  sweeps: [{ id: 's1', parameter: 'Kp', min: 0.1, max: 10, scale: 'log' }],
  simulation: { end: 5, probes: ['y'] },
  view: { activeCut: 'k1', activeProbe: 'y' },
});
const bases = [
  smallLoop,
  smallLoop,
  smallLoop,
  smallLoop,
  smallLoop,
  smallLoop,
  smallLoop,
  smallLoop,
  ...demoDiagrams.map((d) => serializeDiagram(d.diagram)),
];

describe('document fuzz', () => {
  it('10,000 mutated documents load or give a clear InputError; fast; no prototype pollution', () => {
    let loaded = 0;
    let refused = 0;
    let slowest = 0;
    // Untimed warm-up: the first parse of each base compiles the schema and expression parser
    // paths (the per-case limit is about a document's cost, not module start-up under load).
    for (const b of bases) {
      serializeDiagram(parseDiagram(b));
      checkStructure(parseDiagram(b));
    }
    fc.assert(
      fc.property(fc.nat({ max: bases.length - 1 }), fc.array(mutation, { minLength: 1, maxLength: 4 }), (which, muts) => {
        const doc = JSON.parse(bases[which]);
        for (const m of muts) apply(doc, m);
        const text = JSON.stringify(doc);
        const t0 = performance.now();
        try {
          const d = parseDiagram(text);
          loaded++;
          const fs = checkStructure(d);
          for (const f of fs) expect(f.message.length).toBeGreaterThan(0);
          const saved = serializeDiagram(d);
          expect(serializeDiagram(parseDiagram(saved))).toBe(saved);
        } catch (err) {
          if (!(err instanceof InputError)) throw err;
          refused++;
          // a clear message: says it does not load and names a field path or the document
          expect(err.message).toMatch(/^diagram does not load: /);
          expect(err.message.length).toBeLessThan(2000);
        }
        const dt = performance.now() - t0;
        slowest = Math.max(slowest, dt);
        expect(dt).toBeLessThan(1000);
      }),
      { numRuns: 10000 },
    );
    expect(({} as any).polluted).toBeUndefined();
    expect(Object.prototype.hasOwnProperty.call(Object.prototype, 'polluted')).toBe(false);
    // both outcomes occur, so the property exercised loading as well as refusal
    expect(loaded).toBeGreaterThan(100);
    expect(refused).toBeGreaterThan(100);
    console.log(`fuzz: ${loaded} loaded, ${refused} refused, slowest ${slowest.toFixed(1)} ms`);
  }, 120_000); // a few seconds alone; generous for a machine shared with parallel test files
});
