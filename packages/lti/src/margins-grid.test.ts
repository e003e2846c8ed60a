/**
 * loopMargins on points the caller supplies (`gridFrom`: the grid of a live sweep, fixed once
 * per edit) against the closed form of an integrator with dead time, and against its own grid.
 */
import { describe, expect, it } from 'vitest';
import { loopMargins } from './margins.ts';
import { tfFromCoefficients } from './transfer.ts';

/** Log-spaced points, `perDecade` a decade, from lo to hi. */
const logGrid = (lo: number, hi: number, perDecade: number) => {
  const n = Math.ceil(Math.log10(hi / lo) * perDecade);
  return Float64Array.from({ length: n + 1 }, (_, i) => lo * (hi / lo) ** (i / n));
};

describe('loopMargins on a supplied grid', () => {
  // L = K·e^(−sT)/s: |L| = K/ω crosses 1 at ω = K with phase −90° − KT (rad), so PM = 90° − KT·180°/π;
  // the phase reaches −180° at ω = π/(2T), where GM = π/(2KT) (analytic; derived here).
  const K = 2;
  const T = 0.1;
  const L = { ...tfFromCoefficients([K], [0, 1]), delay: T };
  it('K·e^(−sT)/s: PM = 90° − KT and GM = π/(2KT) at π/(2T), on a finer supplied grid as on its own', () => {
    const own = loopMargins(L);
    // Finer than the sweep's own everywhere (1000 a decade and steps ≤ π/(8T)/4 below ωT = 20).
    const fine = [...logGrid(1e-6, 1e6, 1000)];
    const pts: number[] = [];
    for (const w of fine) {
      if (w < 20 / T && pts.length && w - pts[pts.length - 1] > Math.PI / 32 / T) {
        for (let x = pts[pts.length - 1] + Math.PI / 32 / T; x < w; x += Math.PI / 32 / T) pts.push(x);
      }
      pts.push(w);
    }
    const given = loopMargins(L, { gridFrom: pts });
    for (const m of [own, given]) {
      expect(m.gainCrossover!).toBeCloseTo(K, 10);
      expect(m.phaseMarginDeg!).toBeCloseTo(90 - (K * T * 180) / Math.PI, 8);
      expect(m.phaseCrossover!).toBeCloseTo(Math.PI / (2 * T), 8);
      expect(m.gainMargin!).toBeCloseTo(Math.PI / (2 * K * T), 8);
    }
    // Every listed crossover is found on either grid (the supplied one is at least as dense).
    expect(given.phaseCrossovers.length).toBe(own.phaseCrossovers.length);
    given.phaseCrossovers.forEach((w, i) => expect(Math.abs(w - own.phaseCrossovers[i])).toBeLessThan(1e-9 * w));
    expect(given.peakSensitivity!).toBeCloseTo(own.peakSensitivity!, 8);
  });

  it('a supplied grid that does not cover the sweep limits is ignored', () => {
    const own = loopMargins(L);
    const narrow = loopMargins(L, { gridFrom: logGrid(1, 10, 5) });
    expect(narrow.phaseCrossovers).toEqual(own.phaseCrossovers);
    expect(narrow.peakSensitivity).toBe(own.peakSensitivity);
  });
});
