/**
 * Test logs and fits as studies, and fitted models into the document: the demo bump test
 * recovers the plant it was generated from within its intervals; the record of where the model
 * came from round-trips through the file format.
 */
import { describe, expect, it } from 'vitest';
import { checkStructure, emptyDiagram, heatingCascade, parseDiagram, serializeDiagram } from '@loopwright/graph';
import { sha256, supplyValveBump, supplyValveBumpCsv } from '@loopwright/fit';
import { withFittedBlock, withFittedModel } from './fitted-block.ts';
import { runStudy } from './study.ts';
import type { FitData } from './types.ts';

const csv = supplyValveBumpCsv();
const fitted: FitData = runStudy(emptyDiagram(), {
  kind: 'fit',
  csv,
  fileName: 'supply-valve-bump.csv',
  fittedAt: '2026-04-13T10:00:00.000Z',
});
const model = (kind: 'fopdt' | 'sopdt' | 'ipdt') => {
  const p = fitted.fits.find((f) => f.model === kind)!.result;
  if (!p.ok) throw new Error(p.error);
  return p.value;
};

describe('test-log study', () => {
  it('lists the columns of the demo log and the ones a fit would use', () => {
    const t = runStudy(emptyDiagram(), { kind: 'test-log', csv, fileName: 'supply-valve-bump.csv' });
    expect(t).toEqual({
      fileName: 'supply-valve-bump.csv',
      columns: ['time_s', 'valve_pct', 'supply_temp_C'],
      header: true,
      separator: ',',
      decimal: '.',
      rows: supplyValveBump.samples,
      chosen: { time: 'time_s', input: 'valve_pct', output: 'supply_temp_C' },
    });
    expect(runStudy(emptyDiagram(), { kind: 'test-log', csv, output: 2, input: 'SUPPLY_TEMP_C' }).chosen).toEqual({
      time: 'time_s',
      input: 'supply_temp_C',
      output: 'valve_pct',
    });
  });
});

describe('fit study on the demo bump test (a second-order plant with dead time of our own, seeded noise)', () => {
  it('fits all three models, each with its summary and provenance', () => {
    expect(fitted.fits.map((f) => [f.model, f.result.ok])).toEqual([
      ['fopdt', true],
      ['sopdt', true],
      ['ipdt', true],
    ]);
    expect(fitted.log).toMatchObject({ fileName: 'supply-valve-bump.csv', sha256: sha256(csv), samples: 1801, firstRow: 2, lastRow: 1802 });
    expect(fitted.caution).toMatch(/only as good as the test/);
  });
  it('the SOPDT fit holds the generating plant (0.8 K/%, lags 90 s and 12 s, 20 s dead time) inside its 95 % intervals', () => {
    const f = model('sopdt');
    const { truth } = supplyValveBump;
    const inside = (i: [number, number] | null, x: number) => i !== null && i[0] <= x && x <= i[1];
    expect(inside(f.intervals.gain, truth.gain)).toBe(true);
    expect(inside(f.intervals.timeConstants[0], truth.timeConstants[0])).toBe(true);
    expect(inside(f.intervals.timeConstants[1], truth.timeConstants[1])).toBe(true);
    expect(inside(f.intervals.deadTime, truth.deadTime)).toBe(true);
    // The noise (σ = 0.04 K) over a 4.8 K range sets the NRMSE floor: about 0.04/4.8.
    expect(f.nrmse).toBeLessThan(0.012);
    expect(f.nrmse).toBeLessThan(model('fopdt').nrmse);
    expect(f.summary.expression).toBe(f.expression);
  });
  it('the provenance names the file, its SHA-256, the columns and rows, and the date asked for', () => {
    const p = model('sopdt').provenance;
    expect(p.source).toEqual({
      fileName: 'supply-valve-bump.csv',
      sha256: sha256(csv),
      columns: { time: 'time_s', input: 'valve_pct', output: 'supply_temp_C' },
      samples: 1801,
      firstRow: 2,
      lastRow: 1802,
    });
    expect(p.fittedAt).toBe('2026-04-13T10:00:00.000Z');
    expect(p.quality.nrmse).toBe(model('sopdt').nrmse);
  });
  it('bad data is refused naming the row and column', () => {
    const broken = csv.replace('\n5,50.0,', '\n5,50.0x,');
    expect(() => runStudy(emptyDiagram(), { kind: 'fit', csv: broken, models: ['fopdt'] })).toThrow(
      "row 7, column 'valve_pct': '50.0x' is not a number",
    );
    expect(() => runStudy(emptyDiagram(), { kind: 'fit', csv, models: ['fourth' as 'fopdt'] })).toThrow(
      /model: 'fourth' is not one of fopdt, sopdt, ipdt/,
    );
  });
});

describe('a fitted model into the document', () => {
  const p = model('sopdt').provenance;
  it('as a new transfer-function block with its fit record; the file round-trips byte for byte and checks clean', () => {
    const { diagram, block } = withFittedBlock(heatingCascade, p);
    const b = diagram.blocks.find((x) => x.id === block)!;
    expect(b.kind).toBe('transfer-function');
    expect(b.params.expression).toBe(model('sopdt').expression);
    expect(diagram.fits).toEqual([expect.objectContaining({ block, expression: p.expression, fittedAt: p.fittedAt, source: p.source })]);
    const text = serializeDiagram(diagram);
    expect(serializeDiagram(parseDiagram(text))).toBe(text);
    expect(checkStructure(diagram).filter((f) => f.code.includes('fit'))).toEqual([]);
    expect(heatingCascade.fits).toBeUndefined();
  });
  it('into a block that is there: a lag becomes a transfer-function block with the same id and wires; a refit replaces the record', () => {
    const { diagram, notes } = withFittedModel(heatingCascade, 'boiler', p);
    const b = diagram.blocks.find((x) => x.id === 'boiler')!;
    expect(b).toMatchObject({ kind: 'transfer-function', label: 'boiler and mixing (K per %)', params: { expression: p.expression } });
    expect(diagram.wires).toEqual(heatingCascade.wires);
    expect(notes[0]).toContain('became a transfer-function block');
    const again = withFittedModel(diagram, 'boiler', { ...p, fittedAt: '2026-05-01T00:00:00.000Z' }).diagram;
    expect(again.fits!.map((f) => [f.block, f.fittedAt])).toEqual([['boiler', '2026-05-01T00:00:00.000Z']]);
  });
  it('refuses a block that is not a single-input linear block', () => {
    expect(() => withFittedModel(heatingCascade, 'supply-controller', p)).toThrow(/not a pid block; make a new block instead/);
    expect(() => withFittedModel(heatingCascade, 'nope', p)).toThrow(/block nope: the diagram has no such block/);
  });
});
