/**
 * Margins on the fixed grid of precomputed pieces against lti's loopMargins (an independent
 * sweep and refinement of the same definitions) and closed forms.
 */
import { describe, expect, it } from 'vitest';
import { reductionOf } from '@loopwright/graph';
import { loopMargins, poly } from '@loopwright/lti';
import { affineMargins, pieceGrid, type AffinePieces } from './affine-margins.ts';

const reductionAt = (p: AffinePieces, k: number) =>
  reductionOf({
    num: poly.trim(poly.add(p.a, poly.scale(p.b, k))),
    den: poly.trim(poly.add(p.c, poly.scale(p.d, k))),
    delay: p.delay,
    handling: { mode: p.delay > 0 ? 'exact' : 'none', blocks: [], note: '' },
  });

describe('margins from precomputed pieces', () => {
  it('k/(s(s+1)(s+2)): GM = 6/k at ω = √2 for every k (Routh–Hurwitz, Ogata Example 6-1, from memory) [R03], and every figure as loopMargins', () => {
    // L(k) = (0 + k·1)/(s³ + 3s² + 2s + k·0)
    const p: AffinePieces = { a: [0], b: [1], c: [0, 2, 3, 1], d: [], delay: 0 };
    const grid = pieceGrid(p, [1, 1.7, 0.45]);
    for (const k of [0.2, 1, 2, 4, 5.9, 8]) {
      const r = reductionAt(p, k);
      const fast = affineMargins(p, grid, k, r);
      expect(fast).not.toBeNull();
      const ref = loopMargins(r.tf);
      // Above k = 6 the factor 6/k < 1 is a lower gain margin (the loop is unstable).
      expect(k < 6 ? fast!.gainMargin! : fast!.lowerGainMargin!).toBeCloseTo(6 / k, 8);
      expect(k < 6 ? fast!.phaseCrossover! : fast!.lowerPhaseCrossover!).toBeCloseTo(Math.SQRT2, 8);
      if (ref.gainMargin === null) expect(fast!.gainMargin).toBeNull();
      else expect(fast!.gainMargin!).toBeCloseTo(ref.gainMargin, 8);
      expect(fast!.phaseMarginDeg!).toBeCloseTo(ref.phaseMarginDeg!, 8);
      expect(fast!.gainCrossover!).toBeCloseTo(ref.gainCrossover!, 8);
      expect(fast!.peakSensitivity!).toBeCloseTo(ref.peakSensitivity!, 6);
      expect(fast!.bandwidth!).toBeCloseTo(ref.bandwidth!, 8);
      expect(fast!.closedLoopStable).toBe(k < 6);
    }
  });

  it('with a dead time: e^(−0.1s)·k/(s(s+1)) — PM + ω·T phase at the crossover, the delay margin PM/ω_gc (Ogata Sec. 7-6 definitions, from memory)', () => {
    const p: AffinePieces = { a: [0], b: [1], c: [0, 1, 1], d: [], delay: 0.1 };
    const grid = pieceGrid(p, [1, 1.7, 0.45]);
    for (const k of [0.5, 1, 3]) {
      const r = reductionAt(p, k);
      const fast = affineMargins(p, grid, k, r)!;
      const ref = loopMargins(r.tf);
      // |L(jω)| = 1: k = ω·√(1 + ω²) solved exactly as ω² = (−1 + √(1 + 4k²))/2.
      const wc = Math.sqrt((-1 + Math.sqrt(1 + 4 * k * k)) / 2);
      expect(fast.gainCrossover!).toBeCloseTo(wc, 9);
      const pm = 180 - 90 - (Math.atan(wc) * 180) / Math.PI - (wc * 0.1 * 180) / Math.PI;
      expect(fast.phaseMarginDeg!).toBeCloseTo(pm, 7);
      expect(fast.delayMargin!).toBeCloseTo((pm * Math.PI) / 180 / wc, 7);
      expect(fast.gainMargin!).toBeCloseTo(ref.gainMargin!, 7);
      expect(fast.closedLoopStable).toBe(ref.closedLoopStable);
    }
  });

  it('a lightly damped pole pair: no fixed-grid answer (loopMargins packs points around it), so the caller uses loopMargins', () => {
    const p: AffinePieces = { a: [0], b: [1], c: [1, 0.02, 1], d: [], delay: 0 };
    const grid = pieceGrid(p, [1, 1.7, 0.45]);
    expect(affineMargins(p, grid, 0.5, reductionAt(p, 0.5))).toBeNull();
  });
});
