import { describe, expect, it } from 'vitest';
import { InputError, loopMargins, poly, polyRoots, rational, transfer } from '@loopwright/lti';
import { gainForDamping } from './damping.ts';

const fd = poly.fromDescending;

describe('gainForDamping', () => {
  it('K/(s(s + 2)): s² + 2s + K has ζ = 1/√K, so ζ = 0.7 at K = 1/0.49', () => {
    // standard second-order form ωn² = K, 2ζωn = 2 (Ogata, Sec. 5-3; Nise, Sec. 4.6 (from memory))
    const r = gainForDamping([1], fd([1, 2, 0]), 0.7);
    expect(r.gain).toBeCloseTo(1 / 0.49, 10);
    expect(r.crossing!.pole.re).toBeCloseTo(-1, 10);
    expect(r.crossing!.naturalFrequency).toBeCloseTo(Math.sqrt(1 / 0.49), 10);
  });

  it('K/(s(s + 1)(s + 2)), ζ = 0.5: dominant poles −1/3 ± j/√3 at K = 28/27 (book reading 1.0383)', () => {
    // Derived here: on s = r(−1/2 + j√3/2) the imaginary part of s³ + 3s² + 2s vanishes at r = 2/3,
    // and K = −D(s) = 28/27. Ogata, Ch. 6 (from memory) reads K ≈ 1.0383, s ≈ −0.3337 ± j0.5780 off a plot.
    const r = gainForDamping([1], fd([1, 3, 2, 0]), 0.5);
    expect(r.gain).toBeCloseTo(28 / 27, 10);
    expect(r.crossing!.pole.re).toBeCloseTo(-1 / 3, 10);
    expect(r.crossing!.pole.im).toBeCloseTo(1 / Math.sqrt(3), 10);
    expect(Math.abs(r.gain! - 1.0383)).toBeLessThan(2e-3);
    // The third pole: the sum of the poles is −3 (coefficient of s²), so it sits at −3 + 2/3.
    const third = r.crossing!.poles.find((p) => Math.abs(p.im) < 1e-9)!;
    expect(third.re).toBeCloseTo(-3 + 2 / 3, 9);
    // The margins are those of the loop K·N/D at that gain.
    const m = loopMargins(transfer(rational([r.gain!], fd([1, 3, 2, 0]))));
    expect(r.predicted!.phaseMarginDeg).toBe(m.phaseMarginDeg);
    expect(r.predicted!.gainMargin).toBeCloseTo(6 / r.gain!, 9); // Ku = 6 [R03]
  });

  it('reports every crossing of the ζ line with poles of exactly that damping, and flags the dominant ones', () => {
    // K/(s(s + 4)(s² + 4s + 20)) [R08/R09 plant]: several branches cross ζ = 0.3.
    const D = fd([1, 8, 36, 80, 0]);
    const r = gainForDamping([1], D, 0.3);
    expect(r.crossings.length).toBeGreaterThan(0);
    for (const c of r.crossings) {
      const poles = polyRoots(poly.add(D, [c.gain]));
      const onLine = poles.filter((p) => p.im > 0 && Math.abs(-p.re / Math.hypot(p.re, p.im) - 0.3) < 1e-7);
      expect(onLine.length).toBeGreaterThan(0);
      const rightmost = Math.max(...poles.map((p) => p.re));
      expect(c.dominant).toBe(c.pole.re >= rightmost - 1e-6);
    }
    expect(r.gain).toBe(r.crossings.find((c) => c.dominant)?.gain ?? null);
  });

  it('finds every crossing when fast and slow poles make the coefficients span many decades (a cascade with a fast inner loop)', () => {
    // 1e32·K/(s(s + 1)(s + 1e4)^8): the slow pair s² + s + K' has ζ = 0.7 near K' = 1/1.96 (Ogata,
    // Sec. 5-3 (from memory)); the eight poles at −1e4 leave it at (2q + 1)·180°/8 (root-locus
    // departure from a repeated pole, Ogata Sec. 6-3 (from memory)), so branches near |s| = 1e4
    // also cross the ζ = 0.7 ray. Coefficients span 32 decades.
    let D = fd([1, 1, 0]);
    for (let i = 0; i < 8; i++) D = poly.mul(D, [1e4, 1]);
    const r = gainForDamping([1e32], D, 0.7);
    expect(Math.abs(r.gain! - 1 / 1.96) / (1 / 1.96)).toBeLessThan(2e-3);
    expect(r.crossings.some((c) => Math.hypot(c.pole.re, c.pole.im) > 1e3 && Math.hypot(c.pole.re, c.pole.im) < 1e5)).toBe(true);
    for (const c of r.crossings) {
      const poles = polyRoots(poly.add(D, [1e32 * c.gain]));
      const near = Math.min(...poles.map((p) => Math.hypot(p.re - c.pole.re, p.im - c.pole.im) / Math.hypot(c.pole.re, c.pole.im)));
      expect(near).toBeLessThan(1e-5);
    }
  });

  it('rejects ζ outside [0, 1) and a zero N0', () => {
    expect(() => gainForDamping([1], [0, 1], 1)).toThrow(InputError);
    expect(() => gainForDamping([], [0, 1], 0.5)).toThrow(InputError);
  });
});
