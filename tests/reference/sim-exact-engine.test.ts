import { compileModel, simulate } from '@loopwright/sim';
import { expm, matrix, multiply, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { HermiteHistory, Ladder, buildDiagram, compress, ladderFor, matvecCompressed, matvecRect, mulRect } from '@loopwright/sim/testing';

/** A small deterministic generator (Park–Miller), so the random matrices are the same every run. */
function lcg(seed: number) {
  let s = seed;
  return () => {
    s = (s * 48271) % 2147483647;
    return s / 2147483647;
  };
}

describe('matrix exponential ladder against mathjs expm', () => {
  // mathjs expm (Padé with scaling and squaring) is the independent reference; the ladder is
  // built bottom-up in the e^X − I form and applies any step length as rungs plus a series
  const cases: { name: string; N: number; h0: number; make: (r: () => number, N: number) => number[][] }[] = [
    { name: 'random 4×4', N: 4, h0: 0.3, make: (r, N) => Array.from({ length: N }, () => Array.from({ length: N }, () => 4 * r() - 2)) },
    {
      name: 'random 9×9, large norm',
      N: 9,
      h0: 0.05,
      make: (r, N) => Array.from({ length: N }, () => Array.from({ length: N }, () => 200 * r() - 100)),
    },
    {
      name: 'stiff 3×3 (eigenvalues −1, −1e4, and a lightly damped pair)',
      N: 3,
      h0: 0.01,
      make: () => [
        [-1, 0, 0],
        [0, -1e4, 0],
        [1, 2, -0.1],
      ],
    },
  ];
  for (const c of cases) {
    it(`${c.name}: e^(M·s)·z at regular, odd, long and tiny steps`, () => {
      const r = lcg(12345 + c.N);
      const M = c.make(r, c.N);
      const flat = Float64Array.from(M.flat());
      const ladder = new Ladder(flat, c.N, c.h0);
      const z = Float64Array.from({ length: c.N }, () => 2 * r() - 1);
      for (const s of [c.h0, 0.3 * c.h0, 0.734 * c.h0, 2.6 * c.h0, 1e-7 * c.h0]) {
        const want = (expm(matrix(M.map((row) => row.map((v) => v * s)))) as Matrix).toArray() as number[][];
        const ref = want.map((row) => row.reduce((acc, v, j) => acc + v * z[j], 0));
        const got = new Float64Array(c.N);
        ladder.apply(s, z, got);
        const scale = Math.max(1, ...ref.map(Math.abs));
        ref.forEach((v, i) => expect(Math.abs(got[i] - v) / scale, `s = ${s}`).toBeLessThan(1e-11));
      }
    });
  }
});

describe("the exact step's products and the ladder cache", () => {
  it('paired-row and compressed products equal mathjs multiply (odd and even shapes, zeros included)', () => {
    // mathjs multiply is the reference; the shapes reach every remainder path (odd rows, odd N)
    const r = lcg(777);
    for (const [rows, N] of [
      [1, 1],
      [4, 3],
      [5, 7],
      [19, 20],
      [20, 20],
    ]) {
      const A = Array.from({ length: rows }, () => Array.from({ length: N }, () => (r() < 0.4 ? 0 : 2 * r() - 1)));
      const x = Array.from({ length: N }, () => 2 * r() - 1);
      const want = multiply(A, x) as number[];
      const flat = Float64Array.from(A.flat());
      const dense = new Float64Array(rows);
      const sparse = new Float64Array(rows);
      matvecRect(flat, rows, N, x, dense);
      matvecCompressed(compress(flat, rows, N), x, sparse);
      want.forEach((v, i) => {
        expect(Math.abs(dense[i] - v), `${rows}×${N} row ${i}`).toBeLessThan(1e-14);
        expect(Math.abs(sparse[i] - v), `${rows}×${N} row ${i}`).toBeLessThan(1e-14);
      });
    }
  });

  it('the gathered matrix product equals mathjs multiply, scaled (rows past the four-column blocks, empty rows, N up to 70)', () => {
    // mathjs multiply is the reference; N = 70 is past the gather's first size (64)
    const r = lcg(4242);
    for (const [rows, N] of [
      [1, 1],
      [3, 5],
      [7, 6],
      [20, 20],
      [9, 70],
    ]) {
      const sparse = (n: number, m: number) =>
        Array.from({ length: n }, (_, i) => Array.from({ length: m }, () => (i === 1 || r() < 0.6 ? 0 : 2 * r() - 1)));
      const A = sparse(rows, N);
      const B = sparse(N, N);
      const f = -0.37;
      const want = multiply(multiply(A, B), f) as number[][];
      const C = new Float64Array(rows * N).fill(NaN);
      mulRect(Float64Array.from(A.flat()), rows, Float64Array.from(B.flat()), N, C, f);
      want.forEach((row, i) => row.forEach((v, j) => expect(Math.abs(C[i * N + j] - v), `${rows}×${N} (${i}, ${j})`).toBeLessThan(1e-13)));
    }
  });

  it('ladderFor reuses a ladder only for the same generator entry by entry, and a changed entry gets its own exponential', () => {
    const r = lcg(4242);
    const N = 6;
    const M = Array.from({ length: N }, () => Array.from({ length: N }, () => 4 * r() - 2));
    const a = ladderFor(Float64Array.from(M.flat()), N, 0.1);
    expect(ladderFor(Float64Array.from(M.flat()), N, 0.1)).toBe(a);
    expect(ladderFor(Float64Array.from(M.flat()), N, 0.2)).not.toBe(a);
    // one entry changed by 1e-9 (as a slider step changes a gain): a new ladder, checked against mathjs expm
    const M2 = M.map((row) => [...row]);
    M2[2][3] += 1e-9;
    const b = ladderFor(Float64Array.from(M2.flat()), N, 0.1);
    expect(b).not.toBe(a);
    const z = Float64Array.from({ length: N }, () => 2 * r() - 1);
    const want = (expm(matrix(M2.map((row) => row.map((v) => v * 0.1)))) as Matrix).toArray() as number[][];
    const got = new Float64Array(N);
    b.apply(0.1, z, got);
    want.forEach((row, i) => expect(Math.abs(got[i] - row.reduce((acc, v, j) => acc + v * z[j], 0))).toBeLessThan(1e-12));
  });
});

describe('Hermite history (quintic pieces from values, slopes and curvatures)', () => {
  it('reproduces a polynomial of degree 5 exactly', () => {
    // p(t) = 1 − 2t + 0.5t³ − 0.3t⁴ + 0.07t⁵ (chosen here)
    const p = (t: number) => 1 - 2 * t + 0.5 * t ** 3 - 0.3 * t ** 4 + 0.07 * t ** 5;
    const d = (t: number) => -2 + 1.5 * t ** 2 - 1.2 * t ** 3 + 0.35 * t ** 4;
    const e = (t: number) => 3 * t - 3.6 * t ** 2 + 1.4 * t ** 3;
    const h = new HermiteHistory();
    for (let k = 0; k < 5; k++)
      h.push(k * 0.7, (k + 1) * 0.7, p(k * 0.7), d(k * 0.7), e(k * 0.7), p((k + 1) * 0.7), d((k + 1) * 0.7), e((k + 1) * 0.7));
    for (let t = 0.01; t < 3.5; t += 0.0371) expect(Math.abs(h.value(t, t) - p(t))).toBeLessThan(1e-12);
  });

  it('finds two whole steps holding a lattice window, and nothing where a piece is short or the window starts on a joint', () => {
    const h = new HermiteHistory();
    for (const [a, b] of [
      [0, 0.1],
      [0.1, 0.2],
      [0.2, 0.3],
      [0.3, 0.35],
      [0.35, 0.45],
    ])
      h.push(a, b, 1, 0, 0, 1, 0, 0);
    // a step [t, t + 0.1] behind a dead time of 0.5: its window starts at t − 0.5
    const window = (start: number) => h.latticePair(Float64Array.from([start + 0.5, 0.1, 0]), 0.5);
    expect(window(0.13)).toBe(1);
    expect(h.phase).toBeCloseTo(0.3, 12);
    expect(window(0.24)).toBe(-1); // its second piece is 0.05 long
    expect(window(0.2)).toBe(-1); // on a joint: left to sampling
    expect(window(0.4)).toBe(-1); // no piece after it
  });

  it('keeps every piece when it grows past the capacity it was given', () => {
    // the same polynomial as above over 40 pieces in a history sized for 16
    const p = (t: number) => 1 - 2 * t + 0.5 * t ** 3 - 0.3 * t ** 4 + 0.07 * t ** 5;
    const d = (t: number) => -2 + 1.5 * t ** 2 - 1.2 * t ** 3 + 0.35 * t ** 4;
    const e = (t: number) => 3 * t - 3.6 * t ** 2 + 1.4 * t ** 3;
    const h = new HermiteHistory(16);
    for (let k = 0; k < 40; k++)
      h.push(k * 0.1, (k + 1) * 0.1, p(k * 0.1), d(k * 0.1), e(k * 0.1), p((k + 1) * 0.1), d((k + 1) * 0.1), e((k + 1) * 0.1));
    for (let t = 0.013; t < 4; t += 0.0517) expect(Math.abs(h.value(t, t) - p(t))).toBeLessThan(1e-12);
  });

  it('has error of order 6: within |y⁽⁶⁾|·h⁶/46080 on e^(−t), and 64× smaller when h halves', () => {
    // two-point Hermite interpolation remainder y⁽²ⁿ⁾(ξ)/(2n)!·(t − a)ⁿ(t − b)ⁿ, n = 3 (Burden & Faires,
    // Numerical Analysis, §3.4 (from memory)); max of s³(h − s)³ is (h/2)⁶
    const worst = (step: number) => {
      const hist = new HermiteHistory();
      for (let a = 0; a < 2; a += step)
        hist.push(a, a + step, Math.exp(-a), -Math.exp(-a), Math.exp(-a), Math.exp(-a - step), -Math.exp(-a - step), Math.exp(-a - step));
      let w = 0;
      for (let t = 0.0013; t < 2; t += 0.0017) w = Math.max(w, Math.abs(hist.value(t, t) - Math.exp(-t)));
      return w;
    };
    const e1 = worst(0.2);
    const e2 = worst(0.1);
    expect(e1).toBeLessThanOrEqual(0.2 ** 6 / 46080);
    expect(e1 / e2).toBeGreaterThan(50);
    expect(e1 / e2).toBeLessThan(80);
  });
});

describe('exact engine: exact in what it claims to be exact in', () => {
  it('a sinusoid through an integrator: y = a(1 − cos ωt)/ω to round-off (the source is an exosystem)', () => {
    const d = buildDiagram(
      [
        ['r', 'source', { shape: 'sinusoid', amplitude: 1.7, omega: 9 }],
        ['i', 'integrator', { k: 1 }],
        ['y', 'probe'],
      ],
      ['r -> i', 'i -> y'],
    );
    const res = simulate(compileModel(d), { until: 30, outputStep: 0.37 });
    expect(res.engine).toBe('exact');
    res.time.forEach((t, i) => expect(Math.abs(res.traces.y[i] - (1.7 * (1 - Math.cos(9 * t))) / 9)).toBeLessThan(1e-11));
  });

  // Delay 0.4 on steps of 0.03 puts every window a third of the way into a recorded step (the
  // fixed map of two whole pieces); 0.42 lines windows up with the pieces (sampled from them).
  it.each([0.4, 0.42])(
    'a polynomial of degree 5 through a dead time of %s comes out exactly (the window interpolant is of degree 5)',
    (delay) => {
      // ramp t → four integrators: t⁵/120; delayed: (t − delay)⁵/120 after the delay, 0 before
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'ramp', amplitude: 1 }],
          ['i1', 'integrator', { k: 1 }],
          ['i2', 'integrator', { k: 1 }],
          ['i3', 'integrator', { k: 1 }],
          ['i4', 'integrator', { k: 1 }],
          ['dt', 'dead-time', { delay }],
          ['y', 'probe'],
        ],
        ['r -> i1', 'i1 -> i2', 'i2 -> i3', 'i3 -> i4', 'i4 -> dt', 'dt -> y'],
      );
      const res = simulate(compileModel(d), { until: 3, outputStep: 0.03 });
      expect(res.engine).toBe('exact');
      res.time.forEach((t, i) => {
        const want = t <= delay ? 0 : (t - delay) ** 5 / 120;
        expect(Math.abs(res.traces.y[i] - want)).toBeLessThan(1e-12 * Math.max(1, want));
      });
    },
  );
});
