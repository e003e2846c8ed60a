import { describe, expect, it } from 'vitest';
import { studentTCdf, studentTQuantile } from './student-t.ts';

describe('Student t quantiles', () => {
  it('match the printed two-sided 95 % table', () => {
    // Critical values t(0.975, ν) as printed in statistics tables, e.g. Abramowitz & Stegun,
    // Table 26.10 (from memory), to three decimals.
    const table: [number, number][] = [
      [1, 12.706],
      [2, 4.303],
      [5, 2.571],
      [10, 2.228],
      [30, 2.042],
      [120, 1.98],
    ];
    for (const [nu, t] of table) expect(Math.abs(studentTQuantile(0.975, nu) - t)).toBeLessThanOrEqual(5e-4);
  });

  it('has the closed forms for ν = 1 (Cauchy) and ν = 2, and tends to the normal quantile', () => {
    // ν = 1: t_p = tan(π(p − 1/2)); ν = 2: t_p = (2p − 1)·√(2/(4p(1 − p))) (standard results).
    for (const p of [0.6, 0.9, 0.975, 0.995]) {
      expect(Math.abs(studentTQuantile(p, 1) - Math.tan(Math.PI * (p - 0.5)))).toBeLessThanOrEqual(1e-9);
      expect(Math.abs(studentTQuantile(p, 2) - (2 * p - 1) * Math.sqrt(2 / (4 * p * (1 - p))))).toBeLessThanOrEqual(1e-9);
    }
    expect(Math.abs(studentTQuantile(0.975, 1e7) - 1.959964)).toBeLessThanOrEqual(1e-5);
    expect(studentTCdf(0, 7)).toBeCloseTo(0.5, 14);
    expect(studentTQuantile(0.025, 10)).toBeCloseTo(-studentTQuantile(0.975, 10), 12);
  });
});
