import { describe, expect, it } from 'vitest';
import { expm, matrix } from 'mathjs';
import { InputError } from './errors.ts';
import { exactImpulseResponse, exactStepResponse, matrixExponential, steadyStateError } from './exact-response.ts';
import { rational } from './rational.ts';
import { fromDescending, mul } from './poly.ts';
import { realize } from './statespace.ts';

describe('matrixExponential', () => {
  it('agrees with mathjs expm (an independent implementation) on random matrices', () => {
    let seed = 7;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) * 2 - 1;
    for (const [n, scale] of [
      [1, 1],
      [2, 3],
      [4, 0.2],
      [6, 5],
      [8, 12],
    ]) {
      const m = Array.from({ length: n }, () => Array.from({ length: n }, () => rand() * scale));
      const ours = matrixExponential(m);
      const theirs = expm(matrix(m)).toArray() as number[][];
      let big = 0;
      for (const row of theirs) for (const v of row) big = Math.max(big, Math.abs(v));
      for (let i = 0; i < n; i++)
        for (let j = 0; j < n; j++) {
          expect(Math.abs(ours[i][j] - theirs[i][j])).toBeLessThanOrEqual(1e-11 * Math.max(1, big));
        }
    }
  });

  it('e^[[0, w],[−w, 0]] is a rotation (analytic)', () => {
    const w = 2.3;
    const e = matrixExponential([
      [0, w],
      [-w, 0],
    ]);
    expect(e[0][0]).toBeCloseTo(Math.cos(w), 14);
    expect(e[0][1]).toBeCloseTo(Math.sin(w), 14);
    expect(e[1][0]).toBeCloseTo(-Math.sin(w), 14);
  });
});

describe('exact responses', () => {
  it('first-order lag: step 1 − e^(−t/τ), impulse e^(−t/τ)/τ (analytic)', () => {
    const tau = 0.6;
    const r = rational([1], [1, tau]);
    const t = [0, 0.1, 0.5, 1, 3];
    const y = exactStepResponse(r, t);
    const h = exactImpulseResponse(r, t);
    t.forEach((ti, i) => {
      expect(Math.abs(y[i] - (1 - Math.exp(-ti / tau)))).toBeLessThanOrEqual(1e-13);
      expect(Math.abs(h[i] - Math.exp(-ti / tau) / tau)).toBeLessThanOrEqual(1e-12);
    });
  });

  it('unsorted and repeated times give the same values as sorted ones', () => {
    const r = rational([4], [4, 2, 1]);
    const a = exactStepResponse(r, [3, 0.5, 2, 0.5, 1]);
    const b = exactStepResponse(r, [0.5, 1, 2, 3]);
    expect(a[1]).toBe(a[3]);
    expect(Math.abs(a[0] - b[3])).toBeLessThanOrEqual(1e-14);
    expect(Math.abs(a[4] - b[1])).toBeLessThanOrEqual(1e-14);
  });

  it('two independent methods agree: exact step vs fine RK4 integration of the realisation (1e-8)', () => {
    // A fourth-order plant with a zero: (s + 3)/((s + 1)(s² + 0.8s + 4)(s + 5)).
    const den = mul(mul([1, 1], [4, 0.8, 1]), [5, 1]);
    const r = rational([3, 1], den);
    const { A, B, C, D } = realize(r);
    const n = A.length;
    const f = (x: number[]) => A.map((row, i) => row.reduce((s, a, j) => s + a * x[j], 0) + B[i]);
    const h = 1e-3;
    let x = new Array<number>(n).fill(0);
    const checkAt = [500, 1500, 4000, 8000];
    const rk: number[] = [];
    for (let k = 1; k <= 8000; k++) {
      const k1 = f(x);
      const k2 = f(x.map((v, i) => v + (h / 2) * k1[i]));
      const k3 = f(x.map((v, i) => v + (h / 2) * k2[i]));
      const k4 = f(x.map((v, i) => v + h * k3[i]));
      x = x.map((v, i) => v + (h / 6) * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]));
      if (checkAt.includes(k)) rk.push(C.reduce((s, c, i) => s + c * x[i], 0) + D);
    }
    const exact = exactStepResponse(
      r,
      checkAt.map((k) => k * h),
    );
    exact.forEach((v, i) => expect(Math.abs(v - rk[i])).toBeLessThanOrEqual(1e-8));
  });

  it('improper functions and bad delays are InputErrors', () => {
    expect(() => exactStepResponse(rational([0, 0, 1], [1, 1]), [1])).toThrow(InputError);
    expect(() => exactStepResponse(rational([1], [1, 1]), [1], -1)).toThrow(InputError);
    expect(() => exactStepResponse(rational([1], [1, 1]), [NaN])).toThrow(InputError);
  });

  it('steadyStateError refuses an unstable closed loop', () => {
    // K/(s(s+7)(s+11)) with K = 2000 > 1386 (Nise, Sec. 6.4, Example 6.9, from memory)
    expect(() => steadyStateError(rational([2000], mul(mul([0, 1], [7, 1]), [11, 1])), 0)).toThrow(/not stable/);
    expect(() => steadyStateError(rational([1], fromDescending([1, 0, 0])), 0)).toThrow(/not stable/); // 1/s²: poles ±j
  });
});
