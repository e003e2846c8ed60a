import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parseTestLogCsv } from '../csv.ts';
import { fitProcessModel } from '../fit.ts';
import { fitProvenance } from '../provenance.ts';
import { sha256 } from '../sha256.ts';
import { demoTestLogs, supplyValveBump } from './index.ts';

describe('demo test logs', () => {
  for (const demo of demoTestLogs) {
    it(`${demo.fileName} is what its generator writes (run packages/fit/scripts/write-demo-logs.ts after a change)`, () => {
      const committed = readFileSync(fileURLToPath(new URL(`./${demo.fileName}`, import.meta.url)), 'utf8');
      expect(committed === demo.csv()).toBe(true);
    });
  }

  it('the supply-valve bump test fits back to the plant behind it (SOPDT within its intervals, FOPDT near the half rule)', () => {
    const text = demoTestLogs[0].csv();
    const log = parseTestLogCsv(text, { fileName: supplyValveBump.fileName });
    expect(log.time.length).toBe(supplyValveBump.samples);
    const truth = supplyValveBump.truth;
    const f = fitProcessModel(log, { model: 'sopdt' });
    const inside = (iv: [number, number] | null, v: number) => iv !== null && iv[0] <= v && v <= iv[1];
    expect(inside(f.intervals.gain, truth.gain)).toBe(true);
    expect(inside(f.intervals.timeConstants[0], truth.timeConstants[0])).toBe(true);
    expect(inside(f.intervals.timeConstants[1], truth.timeConstants[1])).toBe(true);
    expect(inside(f.intervals.deadTime, truth.deadTime)).toBe(true);
    expect(f.warnings).toEqual([]);
    // RMS residual ≈ noise σ with the logger's 0.01 K resolution (variance 0.01²/12 added).
    expect(Math.abs(f.rmse - Math.hypot(supplyValveBump.noise.sigma, 0.01 / Math.sqrt(12)))).toBeLessThan(0.004);
    // FOPDT: the half rule on the true lags gives τ = 90 + 12/2 = 96, θ = 20 + 6 = 26; the
    // least-squares FOPDT of the same data sits near it (the rule is an approximation: ±10 %).
    const g = fitProcessModel(log, { model: 'fopdt' });
    expect(Math.abs(g.model.timeConstants[0] - 96) / 96).toBeLessThan(0.1);
    expect(Math.abs(g.model.deadTime - 26) / 26).toBeLessThan(0.25);
    expect(g.nrmse).toBeGreaterThan(f.nrmse);
  });

  it('provenance holds the file name, its hash, the model, the quality and the date', () => {
    const text = demoTestLogs[0].csv();
    const log = parseTestLogCsv(text, { fileName: 'supply-valve-bump.csv' });
    const f = fitProcessModel(log, { model: 'fopdt' });
    const p = fitProvenance(log, f, new Date(Date.UTC(2026, 3, 13, 9, 30)));
    expect(p.source).toEqual({
      fileName: 'supply-valve-bump.csv',
      sha256: sha256(text),
      columns: { time: 'time_s', input: 'valve_pct', output: 'supply_temp_C' },
      samples: 1801,
      firstRow: 2,
      lastRow: 1802,
    });
    expect(p.model).toEqual(f.model);
    expect(p.expression).toBe(f.expression);
    expect(p.quality.nrmse).toBe(f.nrmse);
    expect(p.fittedAt).toBe('2026-04-13T09:30:00.000Z');
    expect(JSON.parse(JSON.stringify(p))).toEqual(p);
  });
});
