import { describe, expect, it } from 'vitest';
import { InputError } from '@loopwright/lti';
import { DiagramError, emptyDiagram, parseDiagram, serializeDiagram, validateDiagram } from './document.ts';
import type { Diagram } from './document-types.ts';

const base = (): Diagram => ({
  format: 'loopwright.diagram',
  version: 3,
  title: 'Small loop',
  description: 'A gain around a lag',
  parameters: [{ name: 'Kp', value: 2, unit: '', min: 0, max: 10, scale: 'linear' }],
  blocks: [
    { id: 'r', kind: 'source', position: { x: 0, y: 0 }, params: { shape: 'step', amplitude: 1 } },
    { id: 'e', kind: 'summing-junction', position: { x: 180, y: 0 }, params: { signs: '+-' } },
    { id: 'c', kind: 'gain', label: 'controller', position: { x: 360, y: 0 }, params: { k: 'Kp' } },
    { id: 'g', kind: 'first-order-lag', position: { x: 540, y: 0 }, params: { tau: 0.5, k: 1 } },
    { id: 'y', kind: 'probe', position: { x: 720, y: 0 }, params: {} },
  ],
  wires: [
    { id: 'w1', from: { block: 'r', port: 'out' }, to: { block: 'e', port: 'in1' } },
    { id: 'w2', from: { block: 'e', port: 'out' }, to: { block: 'c', port: 'in' } },
    { id: 'w3', from: { block: 'c', port: 'out' }, to: { block: 'g', port: 'in' } },
    { id: 'w4', from: { block: 'g', port: 'out' }, to: { block: 'y', port: 'in' } },
    { id: 'w5', from: { block: 'g', port: 'out' }, to: { block: 'e', port: 'in2' } },
  ],
  cuts: [{ id: 'cut1', wire: 'w5', label: 'loop' }],
  sweeps: [{ id: 'sw1', parameter: 'Kp', min: 0.1, max: 10, scale: 'log' }],
  simulation: { end: 4, rtol: 1e-6, atol: 1e-9, probes: ['y'] },
  view: { zoom: 1, offset: { x: 0, y: 0 }, theme: 'light' },
});

function loadError(text: string): DiagramError {
  try {
    parseDiagram(text);
  } catch (err) {
    expect(err).toBeInstanceOf(InputError);
    return err as DiagramError;
  }
  throw new Error('expected the diagram to be refused');
}
const withDoc = (edit: (d: any) => void) => {
  const d: any = JSON.parse(serializeDiagram(base()));
  edit(d);
  return JSON.stringify(d);
};

describe('round trip', () => {
  it('load then save gives the same bytes', () => {
    const text = serializeDiagram(base());
    expect(serializeDiagram(parseDiagram(text))).toBe(text);
    expect(text.endsWith('}\n')).toBe(true);
    expect(text.split('\n')[1]).toBe('  "format": "loopwright.diagram",');
  });
  it('writes keys in the fixed order whatever order the object had', () => {
    const d = base();
    d.blocks[3].params = { tau: 0.5, k: 1 }; // catalogue order is k, tau
    const text = serializeDiagram(d);
    expect(text.indexOf('"k": 1')).toBeLessThan(text.indexOf('"tau": 0.5'));
    const shuffled = JSON.stringify(Object.fromEntries(Object.entries(JSON.parse(text)).reverse()));
    expect(serializeDiagram(parseDiagram(shuffled))).toBe(text);
  });
  it('the empty diagram loads', () => {
    const e = emptyDiagram();
    expect(parseDiagram(serializeDiagram(e))).toEqual(e);
  });
  it('refuses to save a non-finite number, naming the field', () => {
    const d = base();
    d.blocks[0].position.x = Infinity;
    expect(() => serializeDiagram(d)).toThrow(/blocks\[0\] \(id "r"\)\.position\.x/);
  });
});

describe('messages name what is at fault', () => {
  it('a block parameter of the wrong type', () => {
    const e = loadError(withDoc((d) => (d.blocks[2].params.k = true)));
    expect(e.message).toContain('blocks[2] (id "c").params.k: expected a number or an expression, got true');
  });
  it('an unknown parameter name lists the known ones', () => {
    const e = loadError(withDoc((d) => (d.blocks[3].params.tc = 1)));
    expect(e.message).toContain('blocks[3] (id "g").params.tc: unknown field (a first-order-lag block has k, tau)');
  });
  it('a block that is not an object', () => {
    expect(loadError(withDoc((d) => (d.blocks[1] = 5))).message).toContain('blocks[1]: expected a block (an object), got 5');
  });
  it('an unknown block kind', () => {
    const e = loadError(withDoc((d) => (d.blocks[1].kind = 'mixer')));
    expect(e.message).toMatch(/blocks\[1\] \(id "e"\)\.kind: unknown block kind; expected one of .*"pid".*got "mixer"/);
  });
  it('a wire with a missing end', () => {
    const e = loadError(withDoc((d) => delete d.wires[1].to));
    expect(e.message).toContain('wires[1] (id "w2").to: missing');
  });
  it('a named parameter with a bad name', () => {
    const e = loadError(withDoc((d) => (d.parameters[0].name = 's')));
    expect(e.message).toContain('parameters[0] (name "s").name: a parameter name is an identifier');
  });
  it('bad summing-junction signs', () => {
    const e = loadError(withDoc((d) => (d.blocks[1].params.signs = '+*')));
    expect(e.message).toContain('blocks[1] (id "e").params.signs: expected 1 to 16 characters, each + or -');
  });
  it('a bad choice', () => {
    const e = loadError(withDoc((d) => (d.blocks[0].params.shape = 'square')));
    expect(e.message).toContain('blocks[0] (id "r").params.shape: expected one of "step", "ramp", "sinusoid", "pulse", got "square"');
  });
  it('lists every problem and counts the rest', () => {
    const e = loadError(withDoc((d) => d.blocks.forEach((b: any) => (b.position = null))));
    expect(e.problems.length).toBe(5);
    expect(e.message).toMatch(/and 2 more$/);
  });
  it('not JSON: gives the position', () => {
    const e = loadError('{"format": "loopwright.diagram",, }');
    expect(e.message).toMatch(/not valid JSON/);
    expect(e.details.position).toBe(32);
  });
  it('not a diagram', () => {
    expect(loadError('[1,2]').message).toContain('expected a JSON object, got a list');
    expect(loadError('{"format":"other"}').message).toContain('not a Loopwright diagram');
  });
});

describe('versions', () => {
  const v0 = {
    format: 'loopwright.diagram',
    version: 0,
    title: 'Old',
    parameters: [{ name: 'K', value: 3 }],
    blocks: [
      { id: 'a', kind: 'gain', position: { x: 0, y: 0 }, parameters: { k: 'K' } },
      { id: 'b', kind: 'probe', position: { x: 180, y: 0 }, parameters: {} },
    ],
    wires: [{ id: 'w', from: { block: 'a', port: 'out' }, to: { block: 'b', port: 'in' } }],
  };
  it('migrates version 0 (block "parameters" → "params"; adds cuts, sweeps, view)', () => {
    const d = parseDiagram(JSON.stringify(v0));
    expect(d.version).toBe(3);
    expect(d.blocks[0].params).toEqual({ k: 'K' });
    expect(d.cuts).toEqual([]);
    expect(d.sweeps).toEqual([]);
    expect(d.view).toEqual({});
    expect(d.description).toBe('');
  });
  it('says when a problem was found after migration', () => {
    const bad = structuredClone(v0) as any;
    bad.blocks[0].parameters.k = [1];
    expect(loadError(JSON.stringify(bad)).message).toContain('after upgrading the document from version 0 to 3');
  });
  it("migrates version 1: the view's simulationEnd becomes simulation.end, the rest of the view stays", () => {
    const v1: any = JSON.parse(serializeDiagram(base()));
    v1.version = 1;
    delete v1.simulation;
    v1.view = { theme: 'dark', simulationEnd: 12.5 };
    const d = parseDiagram(JSON.stringify(v1));
    expect(d.version).toBe(3);
    expect(d.simulation).toEqual({ end: 12.5 });
    expect(d.view).toEqual({ theme: 'dark' });
    // Without an end time there are no settings yet, but the section is there (saved as {}).
    delete v1.view.simulationEnd;
    const e = parseDiagram(JSON.stringify(v1));
    expect(e.simulation).toEqual({});
    expect(serializeDiagram(e)).toContain('"simulation": {},');
  });
  it('version 2 refuses the old place of the end time, and bad simulation settings, naming the field', () => {
    expect(loadError(withDoc((d) => (d.view.simulationEnd = 3))).message).toContain('view.simulationEnd: unknown field');
    expect(loadError(withDoc((d) => (d.simulation.end = -1))).message).toContain('simulation.end: expected a duration above 0 s');
    expect(loadError(withDoc((d) => (d.simulation.rtol = 0))).message).toContain('simulation.rtol: expected a tolerance above 0');
    expect(loadError(withDoc((d) => (d.simulation.probes = ['y', 7]))).message).toContain('simulation.probes[1]');
  });
  it('migrates version 2 by its number: no fits yet, nothing else changes, and it saves as version 3 without a fits section', () => {
    const v2: any = JSON.parse(serializeDiagram(base()));
    v2.version = 2;
    const d = parseDiagram(JSON.stringify(v2));
    expect(d.version).toBe(3);
    expect(d.fits).toBeUndefined();
    expect(serializeDiagram(d)).toBe(serializeDiagram(base()));
  });
  it('refuses a newer version with a clear message', () => {
    const e = loadError(withDoc((d) => (d.version = 7)));
    expect(e.message).toContain('written by a newer Loopwright (format version 7); this one reads versions up to 3');
  });
  it('refuses a missing or non-integer version', () => {
    expect(loadError(withDoc((d) => delete d.version)).message).toContain('version: missing');
    expect(loadError(withDoc((d) => (d.version = 0.5))).message).toContain('expected a whole number');
  });
});

describe('fit records (version 3)', () => {
  const record = () => ({
    block: 'g',
    source: {
      fileName: 'bump.csv',
      sha256: 'ab'.repeat(32),
      columns: { time: 't', input: 'u', output: 'y' },
      samples: 301,
      firstRow: 2,
      lastRow: 302,
    },
    model: { kind: 'fopdt' as const, gain: 2, timeConstants: [5], deadTime: 1.5 },
    expression: '2*exp(-1.5*s)/(5*s+1)',
    quality: { nrmse: 0.0123, rmse: 0.01, confidence: 0.95 },
    intervals: { gain: [1.9, 2.1] as [number, number], timeConstants: [[4.8, 5.2] as [number, number]], deadTime: null },
    method: { between: 'linear' as const, operatingPoint: { input: 0, output: 0, samples: 10 } },
    fittedAt: '2026-04-13T09:30:00.000Z',
  });
  it('round-trip byte for byte, keys in the fixed order whatever order the object had', () => {
    const d = { ...base(), fits: [record()] };
    const text = serializeDiagram(d);
    expect(serializeDiagram(parseDiagram(text))).toBe(text);
    expect(parseDiagram(text).fits).toEqual([record()]);
    const raw: any = JSON.parse(text);
    raw.fits[0] = Object.fromEntries(Object.entries(raw.fits[0]).reverse());
    raw.fits[0].source = Object.fromEntries(Object.entries(raw.fits[0].source).reverse());
    expect(serializeDiagram(parseDiagram(JSON.stringify(raw)))).toBe(text);
    // The section sits between the simulation settings and the view.
    expect(text.indexOf('"simulation"')).toBeLessThan(text.indexOf('"fits"'));
    expect(text.indexOf('"fits"')).toBeLessThan(text.indexOf('"view"'));
  });
  it('an empty list is kept (written whenever present)', () => {
    const text = serializeDiagram({ ...base(), fits: [] });
    expect(text).toContain('"fits": [],');
    expect(serializeDiagram(parseDiagram(text))).toBe(text);
  });
  it('refuses bad records naming the field', () => {
    const bad = (edit: (f: any) => void) =>
      loadError(
        withDoc((d) => {
          d.fits = [record()];
          edit(d.fits[0]);
        }),
      ).message;
    expect(bad((f) => (f.source.sha256 = 'xyz'))).toContain('fits[0].source.sha256');
    expect(bad((f) => (f.model.kind = 'fourth-order'))).toContain('fits[0].model.kind');
    expect(bad((f) => (f.model.timeConstants = [-1]))).toContain('fits[0].model.timeConstants[0]: expected a time constant above 0 s');
    expect(bad((f) => (f.intervals.gain = [1]))).toContain('fits[0].intervals.gain');
    expect(bad((f) => (f.fittedAt = 'yesterday'))).toContain('fits[0].fittedAt: expected an ISO 8601 UTC date-time');
    expect(bad((f) => (f.extra = 1))).toContain('fits[0].extra: unknown field');
    expect(bad((f) => delete f.block)).toContain('fits[0].block: missing');
  });
});

describe('limits and guards', () => {
  it('refuses more than 2,000 blocks', () => {
    const text = withDoc((d) => {
      d.blocks = Array.from({ length: 2001 }, (_, i) => ({ id: `g${i}`, kind: 'gain', position: { x: 0, y: 0 }, params: {} }));
    });
    expect(loadError(text).message).toContain('2001 blocks: more than 2000 is refused');
  });
  it('refuses more than 5 MB', () => {
    const text = withDoc((d) => (d.description = 'x'.repeat(5 * 1024 * 1024)));
    expect(loadError(text).message).toContain('larger than 5 MB');
  });
  it('counts bytes, not characters (3-byte characters)', () => {
    const text = withDoc((d) => (d.description = '€'.repeat(2 * 1024 * 1024)));
    expect(loadError(text).message).toContain('larger than 5 MB');
  });
  it('refuses __proto__ / constructor keys and leaves Object.prototype alone', () => {
    const e = loadError(withDoc((d) => (d.blocks[0].params = JSON.parse('{"__proto__": {"polluted": 1}}'))));
    expect(e.message).toContain('blocks[0] (id "r").params.__proto__: the key "__proto__" is not allowed');
    expect(loadError(withDoc((d) => (d.view = { constructor: { prototype: { polluted: 1 } } }))).message).toContain(
      'view.constructor: the key "constructor" is not allowed',
    );
    expect(({} as any).polluted).toBeUndefined();
  });
  it('refuses absurd nesting without overflowing the stack', () => {
    const deep = '['.repeat(100000) + ']'.repeat(100000);
    expect(() => parseDiagram(`{"format":"loopwright.diagram","version":1,"title":${deep}}`)).toThrow(InputError);
  });
  it('validateDiagram gives a fresh tree (editing the result leaves the input alone)', () => {
    const input = JSON.parse(serializeDiagram(base()));
    const d = validateDiagram(input);
    d.blocks[0].position.x = 99;
    expect(input.blocks[0].position.x).toBe(0);
  });
});
