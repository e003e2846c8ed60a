/**
 * The tabulated exact L(jω) of a live sweep: a Möbius map of k at each frequency, fixed by three
 * sample values, against the closed form it stands for, and refused where k enters otherwise.
 */
import { describe, expect, it } from 'vitest';
import { cx, type Complex } from '@loopwright/lti';
import { exactSourceAt, tabulate } from './affine-exact.ts';

const mul = (a: Complex, b: Complex) => cx(a.re * b.re - a.im * b.im, a.re * b.im + a.im * b.re);
const div = (a: Complex, b: Complex) => {
  const d = b.re * b.re + b.im * b.im;
  return cx((a.re * b.re + a.im * b.im) / d, (a.im * b.re - a.re * b.im) / d);
};
const delay = (w: number, T: number) => cx(Math.cos(w * T), -Math.sin(w * T));

/**
 * An inner loop with dead time closed around a plant, k in the outer controller's numerator and
 * in the inner loop's gain: L(k, jω) = k·P·e^(−jωT₁)/(1 + (2 + k/10)·G·e^(−jωT₂)) — Möbius in k.
 */
const exactL = (k: number) => (w: number) => {
  const s = cx(0, w);
  const P = div(cx(1), mul(s, cx(1, 0.1 * w))); // 1/(s(1 + 0.1s))
  const G = div(cx(1), cx(1, 0.01 * w));
  const inner = mul(cx(2 + k / 10), mul(G, delay(w, 0.003)));
  return div(mul(cx(k), mul(P, delay(w, 0.02))), cx(1 + inner.re, inner.im));
};

const grid = Float64Array.from({ length: 400 }, (_, i) => 10 ** (-2 + (6 * i) / 399));

describe('exact L(jω) of a live sweep, tabulated once', () => {
  const ks = [4, 6.8, 1.8] as const;
  it('reproduces the closed form at any k (on the grid and between its points), negative k included', () => {
    const t = tabulate(grid, ks, [exactL(ks[0]), exactL(ks[1]), exactL(ks[2])], 0.023, { k: 5.4, evaluate: exactL(5.4) });
    expect(t).not.toBeNull();
    for (const k of [0.3, 4, 11, 60, -2.5]) {
      const ref = exactL(k);
      const src = exactSourceAt(t!, k, { rational: { num: [1], den: [1] }, delay: 0 } as never, () => ref);
      for (const w of [grid[0], grid[57], grid[200], grid[399], 0.731, 123.4]) {
        const got = src.evaluate(w);
        const want = ref(w);
        expect(Math.hypot(got.re - want.re, got.im - want.im)).toBeLessThanOrEqual(1e-10 * Math.hypot(want.re, want.im));
      }
    }
  });

  it('refuses a value that does not enter as a Möbius map (k² here): the check at a fourth value fails', () => {
    const sq = (k: number) => (w: number) => mul(cx(k * k), exactL(1)(w));
    expect(tabulate(grid, ks, [sq(ks[0]), sq(ks[1]), sq(ks[2])], 0.023, { k: 5.4, evaluate: sq(5.4) })).toBeNull();
  });
});
