import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { type Complex, cabs, csub, cx, poly, polyRoots, revalComplex, rootSetMismatch } from '@loopwright/lti';
import { cleanRoundOff, closedLoop, characteristicPolynomial, closedLoopPoles, divideExactly } from './reduce.ts';
import { cutFrequencyData, loopAtCut } from './cuts.ts';
import { assembleStateSpace, closedLoopPolesStateSpace, evaluateStateSpace } from './state-space.ts';
import { graph, nestedChain, probeBlock, sourceBlock, sumBlock, tfBlock, wires } from './test-graphs.ts';
import type { LinearGraph } from './linear-graph.ts';

const near = (a: Complex, b: Complex) => cabs(csub(a, b));
const rootError = (got: Complex[], want: Complex[]) => rootSetMismatch(got, want);

/** Two-loop cascade of R27/R28: r → e1 → C1 → e2 → C2 → G2 → G1 → y, H2 from G2 to e2, H1 from G1 to e1. */
function cascade(c1: number, c2: number, g2: [number[], number[]], h2: number, g1: [number[], number[]], h1: number): LinearGraph {
  return graph(
    [
      sourceBlock('r'),
      sumBlock('e1', '+-'),
      tfBlock('C1', [c1]),
      sumBlock('e2', '+-'),
      tfBlock('C2', [c2]),
      tfBlock('G2', ...g2),
      tfBlock('H2', [h2]),
      tfBlock('G1', ...g1),
      tfBlock('H1', [h1]),
      probeBlock('y'),
    ],
    wires('r->e1.in1', 'e1->C1', 'C1->e2.in1', 'e2->C2', 'C2->G2', 'G2->G1', 'G2->H2', 'H2->e2.in2', 'G1->H1', 'outer:H1->e1.in2', 'G1->y'),
  );
}
const innerOnly = (c2: number, g2: [number[], number[]], h2: number) =>
  graph(
    [sourceBlock('r'), sumBlock('e2', '+-'), tfBlock('C2', [c2]), tfBlock('G2', ...g2), tfBlock('H2', [h2]), probeBlock('y')],
    wires('r->e2.in1', 'e2->C2', 'C2->G2', 'G2->H2', 'H2->e2.in2', 'G2->y'),
  );

describe('closed-loop reduction of two-loop cascades', () => {
  it('R27: C1 = 2, C2 = 5, G2 = 1/(s+1), G1 = 1/s, unity feedbacks', () => {
    // Block-diagram algebra, T = C1C2G1G2/(1 + C2G2H2 + C1C2G1G2H1): Nise, Sec. 5.2; Ogata, Sec. 2-3 (from memory) [R27]
    const inner = closedLoop(innerOnly(5, [[1], [1, 1]], 1), { block: 'r' }, { block: 'y' });
    expect(inner.tf.rational.num).toEqual([5]); // inner = 5/(s + 6)
    expect(inner.tf.rational.den[0]).toBeCloseTo(6, 9);
    const t = closedLoop(cascade(2, 5, [[1], [1, 1]], 1, [[1], [1, 0]], 1), { block: 'r' }, { block: 'y' });
    const num = poly.toDescending(t.tf.rational.num);
    const den = poly.toDescending(t.tf.rational.den);
    expect(num.length).toBe(1);
    expect(Math.abs(num[0] - 10)).toBeLessThanOrEqual(1e-9);
    expect(den.length).toBe(3);
    [1, 6, 10].forEach((c, i) => expect(Math.abs(den[i] - c)).toBeLessThanOrEqual(1e-9));
    expect(rootError(t.poles, [cx(-3, 1), cx(-3, -1)])).toBeLessThanOrEqual(1e-4);
    expect(t.delayHandling.mode).toBe('none');
  });

  it('R28: non-unity inner feedback H2 = 2', () => {
    // Same formula, instance C1 = 6, C2 = 1, G2 = 1/(s+2), H2 = 2, G1 = 1/s, H1 = 1 (derived with the formula of R27) [R28]
    const inner = closedLoop(innerOnly(1, [[1], [1, 2]], 2), { block: 'r' }, { block: 'y' });
    expect(inner.tf.rational.num[0]).toBeCloseTo(1, 9);
    expect(Math.abs(inner.tf.rational.den[0] - 4)).toBeLessThanOrEqual(1e-9);
    expect(Math.abs(inner.staticGain - 0.25)).toBeLessThanOrEqual(1e-9);
    const t = closedLoop(cascade(6, 1, [[1], [1, 2]], 2, [[1], [1, 0]], 1), { block: 'r' }, { block: 'y' });
    const den = poly.toDescending(t.tf.rational.den);
    [1, 4, 6].forEach((c, i) => expect(Math.abs(den[i] - c)).toBeLessThanOrEqual(1e-9));
    expect(Math.abs(t.tf.rational.num[0] - 6)).toBeLessThanOrEqual(1e-9);
    expect(rootError(t.poles, [cx(-2, Math.SQRT2), cx(-2, -Math.SQRT2)])).toBeLessThanOrEqual(1e-4);
  });
});

/** The signal-flow graph of R29/R30 as a block diagram: x1 = R + H1·x2 + H2·x3, x4 = G3·x3 + H3·x5. */
function masonGraph(G: [number[], number[]][], H: number[]): LinearGraph {
  return graph(
    [
      sourceBlock('R'),
      sumBlock('x1', '+++'),
      tfBlock('G1', ...G[0]),
      tfBlock('G2', ...G[1]),
      tfBlock('G3', ...G[2]),
      sumBlock('x4', '++'),
      tfBlock('G4', ...G[3]),
      tfBlock('H1', [H[0]]),
      tfBlock('H2', [H[1]]),
      tfBlock('H3', [H[2]]),
      probeBlock('C'),
    ],
    wires(
      'R->x1.in1',
      'x1->G1',
      'G1->G2',
      'G2->G3',
      'G3->x4.in1',
      'x4->G4',
      'G1->H1',
      'H1->x1.in2',
      'G2->H2',
      'H2->x1.in3',
      'G4->H3',
      'H3->x4.in2',
      'G4->C',
    ),
  );
}

describe("Mason's gain formula with touching and non-touching loops", () => {
  it('R29: constant gains, Δ = 5.2 and T = 24/5.2', () => {
    // Mason (1956) (from memory); Nise, Sec. 5.5 (from memory); instance derived in the reference table [R29]
    const g = masonGraph(
      [
        [[2], [1]],
        [[3], [1]],
        [[1], [1]],
        [[4], [1]],
      ],
      [-0.5, -0.1, -0.25],
    );
    const t = closedLoop(g, { block: 'R' }, { block: 'C' });
    // All node gains are constants (D = 1), so the raw denominator is Mason's Δ itself.
    expect(t.rawDenominator.length).toBe(1);
    expect(Math.abs(t.rawDenominator[0] - 5.2)).toBeLessThanOrEqual(1e-9);
    expect(Math.abs(t.rawNumerator[0] - 24)).toBeLessThanOrEqual(1e-9);
    expect(Math.abs(t.staticGain - 4.6154)).toBeLessThanOrEqual(1e-4);
  });

  it('R30: dynamic gains, T = 6/(s³ + 9s² + 16s + 14)', () => {
    // derived in the reference table from the formula of R29 [R30]
    const g = masonGraph(
      [
        [[1], [1, 1]],
        [[2], [1, 0]],
        [[1], [1]],
        [[3], [1, 4]],
      ],
      [-1, -1, -1],
    );
    const t = closedLoop(g, { block: 'R' }, { block: 'C' });
    const den = poly.toDescending(t.tf.rational.den);
    expect(den.length).toBe(4);
    [1, 9, 16, 14].forEach((c, i) => expect(Math.abs(den[i] - c)).toBeLessThanOrEqual(1e-9));
    expect(t.tf.rational.num.length).toBe(1);
    expect(Math.abs(t.tf.rational.num[0] - 6)).toBeLessThanOrEqual(1e-9);
    expect(rootError(t.poles, [cx(-7), cx(-1, 1), cx(-1, -1)])).toBeLessThanOrEqual(1e-6);
    // Δ factors as (1 − L1 − L2)(1 − L3): the characteristic polynomial has the factor s + 7 of the
    // non-touching loop 1 + G4 = (s + 7)/(s + 4).
    const cp = characteristicPolynomial(g).poly;
    expect(Math.abs(poly.evalReal(cp, -7))).toBeLessThanOrEqual(1e-9 * poly.evalReal(cp, 1));
  });
});

describe('method A (elimination) against method B (state-space assembly)', () => {
  const cases: [string, LinearGraph, string, string][] = [
    ['R27 cascade', cascade(2, 5, [[1], [1, 1]], 1, [[1], [1, 0]], 1), 'r', 'y'],
    [
      'R30 graph',
      masonGraph(
        [
          [[1], [1, 1]],
          [[2], [1, 0]],
          [[1], [1]],
          [[3], [1, 4]],
        ],
        [-1, -1, -1],
      ),
      'R',
      'C',
    ],
    ['nested chain of 4', nestedChain(4), 'r', 'y'],
  ];
  for (const [name, g, from, to] of cases) {
    it(`${name}: same transfer at test points and same poles`, () => {
      // Independent check: ml-matrix eigenvalues of the assembled state matrix vs roots of the
      // elimination's determinant; C(sI − A)^−1 B + D vs the reduced rational function.
      const a = closedLoop(g, { block: from }, { block: to });
      const sys = assembleStateSpace(g, { block: from }, { block: to });
      for (const s of [cx(0.3, 0.7), cx(-0.2, 2.5), cx(1.5, -0.4), cx(0, 10)]) {
        const va = revalComplex(a.tf.rational, s);
        const vb = evaluateStateSpace(sys, s);
        expect(near(va, vb)).toBeLessThanOrEqual(1e-9 * Math.max(1, cabs(va)));
      }
      const pa = closedLoopPoles(g);
      const pb = closedLoopPolesStateSpace(g);
      const scale = Math.max(1, ...pa.map(cabs));
      expect(rootError(pb, pa)).toBeLessThanOrEqual(1e-6 * scale);
    });
  }

  it('wire injection and measurement: from a wire to the same wire gives the sensitivity 1/(1 + L)', () => {
    // S = 1/(1 + L) at a loop-breaking point (Skogestad & Postlethwaite, Sec. 2.2 (from memory)).
    const g = graph(
      [sourceBlock('r'), sumBlock('e', '+-'), tfBlock('P', [4], [1, 3, 3, 1]), probeBlock('y')],
      wires('r->e.in1', 'e->P', 'fb:P->e.in2', 'P->y'),
    );
    const s = closedLoop(g, { wire: 'fb' }, { wire: 'fb' });
    const L = loopAtCut(g, 'fb');
    for (const z of [cx(0.1, 1), cx(-0.5, 3)]) {
      const l = revalComplex(L.rational, z);
      const want = { re: (1 + l.re) / ((1 + l.re) ** 2 + l.im ** 2), im: -l.im / ((1 + l.re) ** 2 + l.im ** 2) };
      expect(near(revalComplex(s.tf.rational, z), want)).toBeLessThanOrEqual(1e-12);
    }
  });
});

describe('cuts', () => {
  it('L at the feedback wire of a unity loop is the forward path, sign for 1 + L = 0 (R21 plant)', () => {
    // L(s) = 4/(s+1)^3 of R21; closed-loop characteristic polynomial (s+1)^3 + 4 (definition of L).
    const g = graph(
      [sourceBlock('r'), sumBlock('e', '+-'), tfBlock('P', [4], [1, 3, 3, 1]), probeBlock('y')],
      wires('r->e.in1', 'e->P', 'fb:P->e.in2', 'P->y'),
    );
    const L = loopAtCut(g, 'fb');
    expect(L.rational.num).toEqual([4]);
    expect(poly.toDescending(L.rational.den)).toEqual([1, 3, 3, 1]);
    const cl = closedLoopPoles(g);
    expect(rootError(cl, polyRoots(poly.add(L.rational.den, L.rational.num)))).toBeLessThanOrEqual(1e-9);
  });

  it('outer cut of a cascade sees the inner loop closed: 1 + L_outer carries the whole characteristic equation', () => {
    // Mason: Δ_closed = Δ_cut · (1 + L) for a cut through the loops (Mason 1956, from memory).
    const g = cascade(2, 5, [[1], [1, 1]], 1, [[1], [1, 0]], 1);
    const L = loopAtCut(g, 'outer');
    // L_outer = C1·(inner closed loop)·G1 = 2·5/(s+6)·1/s
    expect(Math.abs(L.rational.num[0] - 10)).toBeLessThanOrEqual(1e-12);
    expect(poly.toDescending(L.rational.den).map((c) => Math.round(c * 1e9) / 1e9)).toEqual([1, 6, 0]);
  });

  it('a wire on no loop is refused by name', () => {
    const g = cascade(2, 5, [[1], [1, 1]], 1, [[1], [1, 0]], 1);
    expect(() => loopAtCut(g, 'w1')).toThrow(/wire w1/);
  });
});

describe('dead time', () => {
  it('kept exact where it factors out of the path; Padé where it sits in a loop', () => {
    const g = graph(
      [
        sourceBlock('r'),
        tfBlock('pre', [1], [1], 0.5),
        sumBlock('e', '+-'),
        tfBlock('P', [2], [1, 1], 1),
        probeBlock('y'),
        probeBlock('u'),
      ],
      wires('r->pre', 'pre->e.in1', 'e->P', 'fb:P->e.in2', 'P->y', 'pre->u'),
    );
    const pre = closedLoop(g, { block: 'r' }, { block: 'u' });
    expect(pre.delayHandling.mode).toBe('exact');
    expect(pre.delay).toBe(0.5);
    const loop = closedLoop(g, { block: 'r' }, { block: 'y' });
    expect(loop.delayHandling.mode).toBe('pade');
    expect(loop.delayHandling.blocks).toEqual(['P']);
    // L at the cut keeps both dead times exact: the loop is opened there.
    const L = loopAtCut(g, 'fb');
    expect(L.delay).toBe(1);
    // Closed-loop poles: the lag, plus the Padé (3,3) poles of the dead time inside the loop; the
    // dead time outside every loop adds none. Roots of (s + 1)·D3(s) + 2·N3(s) with the Padé
    // coefficients 1, 1/2, 1/10, 1/120 (Golub & Van Loan, Sec. 9.3.1 (from memory)) [R31/R32 family].
    const d3 = [1, 0.5, 0.1, 1 / 120];
    const n3 = d3.map((c, k) => (k % 2 ? -c : c));
    const want = polyRoots(poly.add(poly.mul([1, 1], d3), poly.scale(n3, 2)));
    expect(rootError(closedLoopPoles(g), want)).toBeLessThanOrEqual(1e-9);
  });
});

describe('round-off cleaning after a cancellation', () => {
  it('drops a coefficient at round-off level and keeps a genuine small one', () => {
    // (s² + 100)(s² + 2s + 4) = s⁴ + 2s³ + 104s² + 200s + 400; perturb the s³ term by 1e-13.
    const exact = poly.mul([100, 0, 1], [4, 2, 1]);
    const noisy = poly.mul([100, 1e-13, 1], [4, 2, 1]);
    expect(cleanRoundOff(poly.mul([100, 0, 1], [4, 0, 1]).map((c, i) => (i === 1 ? 3e-14 : c)))[1]).toBe(0);
    expect(cleanRoundOff(noisy)).toEqual(poly.trim(noisy)); // every coefficient is genuine here
    expect(cleanRoundOff(exact)).toEqual(exact);
    // A lightly damped pair s² + 0.002s + 1 keeps its damping term (1e-3 ≫ 1e-12).
    expect(cleanRoundOff([1, 0.002, 1])).toEqual([1, 0.002, 1]);
  });
});

describe('injection at a block output', () => {
  it('a disturbance added to the plant output reaches it through S = 1/(1 + L)', () => {
    // Output disturbance: y = d/(1 + L) (Skogestad & Postlethwaite, Sec. 2.2 (from memory)).
    const g = graph(
      [sourceBlock('r'), sumBlock('e', '+-'), tfBlock('C', [3]), tfBlock('P', [2], [1, 1, 0]), probeBlock('y')],
      wires('r->e.in1', 'e->C', 'C->P', 'fb:P->e.in2', 'P->y'),
    );
    const t = closedLoop(g, { block: 'P' }, { block: 'y' });
    // L = 6/(s² + s): S = (s² + s)/(s² + s + 6)
    expect(poly.toDescending(t.tf.rational.num).map((c) => +c.toFixed(12))).toEqual([1, 1, 0]);
    expect(poly.toDescending(t.tf.rational.den).map((c) => +c.toFixed(12))).toEqual([1, 1, 6]);
  });
});

describe('property: methods A and B agree on random cascades', () => {
  it('random gains and lags in nested loops of depth 1–4 (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 4 }),
        fc.array(
          fc.tuple(
            fc.double({ min: 0.1, max: 20, noNaN: true }),
            fc.double({ min: 0.01, max: 5, noNaN: true }),
            fc.constantFrom('+-', '++'),
          ),
          { minLength: 4, maxLength: 4 },
        ),
        (n, stages) => {
          const blocks = [sourceBlock('r'), probeBlock('y')];
          const ws: string[] = ['r->e1.in1'];
          for (let i = 1; i <= n; i++) {
            const [k, tau, signs] = stages[i - 1];
            blocks.push(sumBlock(`e${i}`, signs), tfBlock(`C${i}`, [k]), tfBlock(`P${i}`, [1], [tau, 1]));
            ws.push(`e${i}->C${i}`, `fb${i}:P${i}->e${i}.in2`, i < n ? `C${i}->e${i + 1}.in1` : `C${i}->P${i}`);
            if (i > 1) ws.push(`P${i}->P${i - 1}`);
          }
          ws.push('P1->y');
          const g = graph(blocks, wires(...ws));
          const a = closedLoop(g, { block: 'r' }, { block: 'y' });
          const sys = assembleStateSpace(g, { block: 'r' }, { block: 'y' });
          const s = cx(0.37, 1.3);
          const va = revalComplex(a.tf.rational, s);
          expect(near(va, evaluateStateSpace(sys, s))).toBeLessThanOrEqual(1e-8 * Math.max(1, cabs(va)));
          const pa = closedLoopPoles(g);
          const scale = Math.max(1, ...pa.map(cabs));
          expect(rootError(closedLoopPolesStateSpace(g), pa)).toBeLessThanOrEqual(1e-6 * scale);
        },
      ),
      { numRuns: 60 },
    );
  });
});

describe('exact division by block factors', () => {
  it('recovers the cofactor of a product and refuses a non-factor', () => {
    // p = f·q by construction (polynomial multiplication); a Padé-like factor with large roots
    // and a small one are both recovered.
    const q = poly.fromRoots([cx(-1), cx(-0.5, 2), cx(-0.5, -2), cx(-30)]);
    for (const f of [poly.fromRoots([cx(-9288.7), cx(-7355.6, 7017.5), cx(-7355.6, -7017.5)]), [500, 1], [0, 1]]) {
      const got = divideExactly(poly.mul(q, f), f)!;
      expect(got.length).toBe(q.length);
      got.forEach((c, i) => expect(Math.abs(c - q[i])).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(q[i]))));
    }
    expect(divideExactly(q, [2, 1])).toBeNull();
  });
});

describe('frequency data at a cut', () => {
  it('S + T = 1 and |S| peaks at Ms = 3 for L = 4/(s+1)³ (R25)', () => {
    // Ms exact 3 at ω = √2: Skogestad & Postlethwaite, Sec. 2.4.3 definitions (from memory); values derived in the table [R25]
    const g = graph(
      [sourceBlock('r'), sumBlock('e', '+-'), tfBlock('P', [4], [1, 3, 3, 1]), probeBlock('y')],
      wires('r->e.in1', 'e->P', 'fb:P->e.in2', 'P->y'),
    );
    const f = cutFrequencyData(g, 'fb', undefined, [0.5, 1, Math.SQRT2, 2]);
    f.omega.forEach((_, i) => {
      expect(Math.abs(f.sensitivity.re[i] + f.complementary.re[i] - 1)).toBeLessThan(1e-12);
      expect(Math.abs(f.sensitivity.im[i] + f.complementary.im[i])).toBeLessThan(1e-12);
    });
    expect(Math.abs(10 ** (f.sensitivity.magDb[2] / 20) - 3)).toBeLessThan(1e-6);
  });
});
