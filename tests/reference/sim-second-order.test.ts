import { compileModel, simulate } from '@loopwright/sim';
import { describe, expect, it } from 'vitest';
import { buildDiagram } from '@loopwright/sim/testing';

for (const engine of ['exact', 'odex'] as const) {
  describe(`second-order step response (R20, R17; ${engine} engine)`, () => {
    // 4/(s² + 2s + 4): ζ = 0.5, ωn = 2; y(t) = 1 − e^(−t)(cos √3t + sin √3t/√3) — derived here from the
    // standard underdamped closed form, Ogata, Sec. 5-3 (from memory) [R20]
    const closed = (t: number) => 1 - Math.exp(-t) * (Math.cos(Math.sqrt(3) * t) + Math.sin(Math.sqrt(3) * t) / Math.sqrt(3));

    const run = (outputStep: number, finalValue?: number) => {
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1 }],
          ['g', 'second-order', { k: 1, wn: 2, zeta: 0.5 }],
          ['y', 'probe'],
        ],
        ['r -> g', 'g -> y'],
      );
      return simulate(compileModel(d), {
        until: 8,
        rtol: 1e-9,
        atol: 1e-12,
        outputStep,
        engine,
        ...(finalValue !== undefined ? { metricsOptions: { finalValue } } : {}),
      });
    };

    it('values at chosen times', () => {
      const res = run(0.5);
      const y = (t: number) => res.traces.y[res.time.findIndex((x) => Math.abs(x - t) < 1e-9)];
      // R20 table values, abs 1e-5
      expect(Math.abs(y(0.5) - 0.3403)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(y(1) - 0.84943)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(y(2) - 1.15312)).toBeLessThanOrEqual(1e-5);
      expect(Math.abs(y(3) - 1.00229)).toBeLessThanOrEqual(1e-5);
      res.time.forEach((t, i) => expect(Math.abs(res.traces.y[i] - closed(t))).toBeLessThan(1e-8));
    });

    it('overshoot exp(−ζπ/√(1−ζ²)) and peak time π/ωd, from the metrics of the trace (R17, R20)', () => {
      // the run ends at 8 s, where y is within 4e-4 of 1: measure against the known y∞ = 1
      const res = run(0.001, 1);
      const m = res.metrics.y!;
      const zeta = 0.5;
      const wd = 2 * Math.sqrt(1 - zeta * zeta);
      // %OS = 100·exp(−ζπ/√(1 − ζ²)): Ogata, Sec. 5-3; Nise, Eq. (4.38) (from memory) [R17: 16.30 % at ζ = 0.5]
      const os = 100 * Math.exp((-zeta * Math.PI) / Math.sqrt(1 - zeta * zeta));
      expect(Math.abs(os - 16.3)).toBeLessThanOrEqual(0.01);
      expect(Math.abs(m.overshootPct! - os)).toBeLessThan(1e-4);
      expect(Math.abs(m.peakTime! - Math.PI / wd)).toBeLessThan(1e-4); // tp = π/ωd = 1.8138 s [R20]
      expect(Math.abs(m.peak! - (1 + Math.exp(-Math.PI / Math.sqrt(3))))).toBeLessThan(1e-6); // y(tp) = 1.16303 [R20]
      expect(Math.abs(m.riseTime! - 0.8188)).toBeLessThanOrEqual(1e-4); // exact 10–90 % rise time [R20]
      expect(Math.abs(m.settlingTime! - 4.0382)).toBeLessThanOrEqual(1e-4); // exact ±2 % settling time [R20]
    });
  });
}
