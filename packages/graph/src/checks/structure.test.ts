import { describe, expect, it } from 'vitest';
import type { Block, Diagram } from '../document-types.ts';
import { emptyDiagram } from '../document.ts';
import { checkStructure } from './structure.ts';
import type { Finding } from './finding.ts';

const at = (x: number): Block['position'] => ({ x, y: 0 });
/** A unity-feedback loop source → junction → gain → lag → probe, lag fed back to in2. */
function loop(): Diagram {
  return {
    ...emptyDiagram('loop'),
    parameters: [{ name: 'Kp', value: 2, min: 0, max: 10 }],
    blocks: [
      { id: 'r', kind: 'source', position: at(0), params: {} },
      { id: 'e', kind: 'summing-junction', position: at(180), params: { signs: '+-' } },
      { id: 'c', kind: 'gain', position: at(360), params: { k: 'Kp' } },
      { id: 'g', kind: 'first-order-lag', position: at(540), params: { tau: 0.5 } },
      { id: 'y', kind: 'probe', position: at(720), params: {} },
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
    view: { activeCut: 'k1', activeSweep: 's1', activeProbe: 'y' },
  };
}
const codes = (fs: Finding[]) => fs.map((f) => f.code).sort();
const only = (fs: Finding[], code: string) => {
  const hits = fs.filter((f) => f.code === code);
  expect(hits.length, `findings: ${JSON.stringify(fs)}`).toBe(1);
  return hits[0];
};

describe('checkStructure', () => {
  it('a sound loop has no findings', () => {
    expect(checkStructure(loop())).toEqual([]);
  });
  it('unconnected input and output', () => {
    const d = loop();
    d.wires = d.wires.filter((w) => w.id !== 'w5' && w.id !== 'w4');
    d.cuts = [];
    d.view = {};
    const fs = checkStructure(d);
    const ins = fs.filter((x) => x.code === 'unconnected-input');
    expect(ins.map((x) => x.blocks)).toEqual([['e'], ['y']]);
    expect(ins[0].message).toBe('input "in2" not connected (taken as 0)');
    expect(fs.find((x) => x.code === 'unconnected-output')?.blocks).toEqual(['g']);
  });
  it('wire into an output, from an input, to an unknown port', () => {
    const d = loop();
    d.wires.push({ id: 'w6', from: { block: 'c', port: 'out' }, to: { block: 'g', port: 'out' } });
    d.wires.push({ id: 'w7', from: { block: 'g', port: 'in' }, to: { block: 'y', port: 'in' } });
    d.wires.push({ id: 'w8', from: { block: 'c', port: 'out' }, to: { block: 'e', port: 'in3' } });
    const fs = checkStructure(d);
    expect(only(fs, 'wire-into-output').wires).toEqual(['w6']);
    expect(only(fs, 'wire-from-input').wires).toEqual(['w7']);
    const u = only(fs, 'unknown-port');
    expect(u.wires).toEqual(['w8']);
    expect(u.message).toContain('inputs: in1, in2');
    expect(only(fs, 'multiple-drivers').wires).toEqual(['w4', 'w7']);
  });
  it('fan-out from one output is fine; two wires into one input is not', () => {
    const d = loop();
    d.blocks.push({ id: 'y2', kind: 'probe', position: at(900), params: {} });
    d.wires.push({ id: 'w9', from: { block: 'g', port: 'out' }, to: { block: 'y2', port: 'in' } });
    expect(checkStructure(d)).toEqual([]);
    d.wires.push({ id: 'w10', from: { block: 'c', port: 'out' }, to: { block: 'y2', port: 'in' } });
    const f = only(checkStructure(d), 'multiple-drivers');
    expect(f.blocks).toEqual(['y2']);
    expect(f.wires).toEqual(['w9', 'w10']);
  });
  it('duplicate ids in each collection', () => {
    const d = loop();
    d.blocks.push({ ...d.blocks[2], position: at(360) });
    d.wires.push({ ...d.wires[0] });
    d.cuts.push({ id: 'k1', wire: 'w4' });
    d.sweeps.push({ ...d.sweeps[0] });
    d.parameters.push({ name: 'Kp', value: 1 });
    const fs = checkStructure(d);
    expect(fs.filter((f) => f.code === 'duplicate-id').map((f) => f.blocks?.[0] ?? f.wires?.[0] ?? f.field)).toEqual([
      'c',
      'w1',
      'cuts.k1',
      'sweeps.s1',
    ]);
    only(fs, 'duplicate-parameter');
  });
  it('dangling references from wires, cuts, sweeps and the view', () => {
    const d = loop();
    d.wires.push({ id: 'w6', from: { block: 'ghost', port: 'out' }, to: { block: 'y', port: 'in' } });
    d.cuts.push({ id: 'k2', wire: 'w99' });
    d.sweeps.push({ id: 's2', parameter: 'Ti', min: 1, max: 2, scale: 'linear' });
    d.view = { activeCut: 'nope', activeProbe: 'c' };
    const fs = checkStructure(d);
    expect(only(fs, 'dangling-wire').message).toContain('"ghost"');
    expect(only(fs, 'dangling-cut').message).toBe('cut k2: refers to wire "w99", which does not exist');
    expect(only(fs, 'dangling-sweep').message).toContain('"Ti"');
    expect(fs.filter((f) => f.code === 'dangling-view').length).toBe(2);
  });
  it('fit records that name a missing block, or a block twice', () => {
    const d = loop();
    const rec = (block: string) => ({
      block,
      source: { fileName: null, sha256: null, columns: { time: 't', input: 'u', output: 'y' }, samples: 20, firstRow: null, lastRow: null },
      model: { kind: 'fopdt' as const, gain: 1, timeConstants: [0.5], deadTime: 0 },
      expression: '1/(0.5*s+1)',
      quality: { nrmse: 0.01, rmse: 0.01, confidence: 0.95 },
      intervals: { gain: null, timeConstants: [null], deadTime: null },
      method: { between: 'linear' as const, operatingPoint: { input: 0, output: 0, samples: 1 } },
      fittedAt: '2026-01-01T00:00:00.000Z',
    });
    d.fits = [rec('g')];
    expect(checkStructure(d)).toEqual([]);
    d.fits = [rec('g'), rec('gone'), rec('g')];
    const fs = checkStructure(d);
    expect(only(fs, 'dangling-fit').message).toBe('fits: the record of a fitted model names block "gone", which does not exist');
    expect(only(fs, 'duplicate-fit').blocks).toEqual(['g']);
  });
  it('unknown named parameters in expressions name the block and field', () => {
    const d = loop();
    d.blocks[2].params.k = '2*Kp*Kv';
    const f = only(checkStructure(d), 'unknown-parameter');
    expect(f.blocks).toEqual(['c']);
    expect(f.field).toBe('blocks.c.params.k');
    expect(f.message).toBe('field k: "2*Kp*Kv" uses "Kv", not a named parameter');
    // an override makes the name known
    expect(checkStructure(d, { Kv: 1 }).some((x) => x.code === 'unknown-parameter')).toBe(false);
  });
  it('improper transfer-function blocks', () => {
    const d = loop();
    d.blocks[2] = { id: 'c', kind: 'transfer-function', position: at(360), params: { expression: 'Kp*(s + 1)^2/(s + 5)' } };
    const f = only(checkStructure(d), 'improper-block');
    expect(f.blocks).toEqual(['c']);
    expect(f.message).toContain('numerator degree 2 > denominator degree 1');
    d.blocks[2].params.expression = 'Kp*(s + 1)/(s + 5)';
    expect(checkStructure(d)).toEqual([]);
  });
  it('values out of physical range and bad expressions', () => {
    const d = loop();
    d.blocks[3].params.tau = -0.5;
    d.blocks[2].params.k = '2*(Kp';
    const fs = checkStructure(d);
    expect(only(fs, 'invalid-parameter').message).toBe('field tau: -0.5 s must be at least 0 s');
    expect(only(fs, 'invalid-expression').field).toBe('blocks.c.params.k');
  });
  it('sweep and parameter ranges', () => {
    const d = loop();
    d.sweeps[0] = { id: 's1', parameter: 'Kp', min: 0, max: 10, scale: 'log' };
    d.parameters[0].value = 20;
    const fs = checkStructure(d);
    expect(only(fs, 'sweep-range').message).toContain('log scale needs min > 0');
    expect(only(fs, 'parameter-out-of-range').message).toContain('outside its slider range [0, 10]');
  });
  it('unused parameters and a sweep that changes nothing', () => {
    const d = loop();
    d.blocks[2].params.k = 3;
    d.parameters.push({ name: 'Spare', value: 1 });
    const fs = checkStructure(d);
    expect(only(fs, 'unused-parameter').field).toBe('parameters.Spare');
    expect(only(fs, 'unused-sweep-parameter').field).toBe('sweeps.s1.parameter');
  });
  it('cycles in the wiring alone are not a structural problem (feedback is the point)', () => {
    const d = loop();
    d.wires.push({ id: 'w6', from: { block: 'c', port: 'out' }, to: { block: 'c', port: 'in' } });
    expect(codes(checkStructure(d))).toEqual(['multiple-drivers']);
  });
});
