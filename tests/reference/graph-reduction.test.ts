import { describe, expect, it } from 'vitest';
import { type Complex, cabs, csub, cx, poly, revalComplex, rootSetMismatch } from '@loopwright/lti';
import {
  DIAGRAM_FORMAT,
  DIAGRAM_VERSION,
  type BlockKind,
  type Diagram,
  type ParamValue,
  assembleStateSpace,
  checkDiagram,
  closedLoop,
  closedLoopPoles,
  closedLoopPolesStateSpace,
  evaluateStateSpace,
  loopAtCut,
  validateDiagram,
} from '@loopwright/graph';

/** A diagram from [id, kind, params] blocks and "id:from->to.port" wires, validated by the document schema. */
function diagram(blocks: [string, BlockKind, Record<string, ParamValue>?][], wires: string[]): Diagram {
  return validateDiagram({
    format: DIAGRAM_FORMAT,
    version: DIAGRAM_VERSION,
    title: 'reference',
    description: '',
    parameters: [],
    blocks: blocks.map(([id, kind, params], i) => ({ id, kind, position: { x: 100 * i, y: 0 }, params: params ?? {} })),
    wires: wires.map((s, i) => {
      const m = /^(?:(\w+):)?(\w+)->(\w+)(?:\.(\w+))?$/.exec(s)!;
      return { id: m[1] ?? `w${i + 1}`, from: { block: m[2], port: 'out' }, to: { block: m[3], port: m[4] ?? 'in' } };
    }),
    cuts: [],
    sweeps: [],
    view: {},
  });
}

const rootError = (got: Complex[], want: Complex[]) => rootSetMismatch(got, want);

const expectDescending = (asc: readonly number[], want: number[], tol: number) => {
  const d = poly.toDescending(asc);
  expect(d.length).toBe(want.length);
  want.forEach((c, i) => expect(Math.abs(d[i] - c)).toBeLessThanOrEqual(tol));
};

/** Both methods agree: the state-space assembly's transfer and eigenvalues against the elimination. */
function expectMethodsAgree(d: Diagram, from: string, to: string) {
  const a = closedLoop(d, { block: from }, { block: to });
  const sys = assembleStateSpace(d, { block: from }, { block: to });
  for (const s of [cx(0.2, 0.9), cx(-0.4, 3), cx(2, -1)]) {
    const va = revalComplex(a.tf.rational, s);
    expect(cabs(csub(va, evaluateStateSpace(sys, s)))).toBeLessThanOrEqual(1e-9 * Math.max(1, cabs(va)));
  }
  expect(rootError(closedLoopPolesStateSpace(d), closedLoopPoles(d))).toBeLessThanOrEqual(1e-6);
}

/** R27/R28 cascade: r → e1 → C1 → e2 → C2 → G2 → G1 → y, H2 from G2 into e2, H1 from G1 into e1. */
const cascade = (c1: number, c2: number, g2tau: number, g2k: number, h2: number) =>
  diagram(
    [
      ['r', 'source'],
      ['e1', 'summing-junction', { signs: '+-' }],
      ['C1', 'gain', { k: c1 }],
      ['e2', 'summing-junction', { signs: '+-' }],
      ['C2', 'gain', { k: c2 }],
      ['G2', 'first-order-lag', { k: g2k, tau: g2tau }],
      ['H2', 'gain', { k: h2 }],
      ['G1', 'integrator', { k: 1 }],
      ['y', 'probe'],
      ['yi', 'probe'],
    ],
    [
      'r->e1.in1',
      'e1->C1',
      'C1->e2.in1',
      'e2->C2',
      'C2->G2',
      'G2->H2',
      'inner:H2->e2.in2',
      'G2->G1',
      'outer:G1->e1.in2',
      'G1->y',
      'G2->yi',
    ],
  );

describe('two-loop cascades (block-diagram algebra)', () => {
  it('R27: T = 10/(s² + 6s + 10), poles −3 ± j; inner closed loop 5/(s + 6)', () => {
    // T = C1C2G1G2/(1 + C2G2H2 + C1C2G1G2H1): Nise, Sec. 5.2; Ogata, Sec. 2-3 (from memory); instance derived in the reference table [R27]
    // G2 = 1/(s+1) is a first-order lag with k = 1, tau = 1.
    const d = cascade(2, 5, 1, 1, 1);
    const t = closedLoop(d, { block: 'r' }, { block: 'y' });
    expectDescending(t.tf.rational.num, [10], 1e-9);
    expectDescending(t.tf.rational.den, [1, 6, 10], 1e-9);
    expect(rootError(t.poles, [cx(-3, 1), cx(-3, -1)])).toBeLessThanOrEqual(1e-4);
    // Inner closed loop: the outer loop opened, from the inner set-point to the inner output.
    const L = loopAtCut(d, 'outer');
    // L_outer = C1 · inner · G1 = 2 · 5/(s + 6) · 1/s  ⇒  inner = L·s/2.
    const inner = { num: poly.scale(poly.mul(L.rational.num, [0, 1]), 1 / 2), den: L.rational.den };
    expect(Math.abs(poly.evalReal(inner.num, 1) / poly.evalReal(inner.den, 1) - 5 / 7)).toBeLessThanOrEqual(1e-9);
    expectMethodsAgree(d, 'r', 'y');
  });

  it('R28: non-unity inner feedback H2 = 2: inner 1/(s + 4), T = 6/(s² + 4s + 6), poles −2 ± j√2', () => {
    // Formula of R27, instance C1 = 6, C2 = 1, G2 = 1/(s+2) (first-order lag k = 0.5, tau = 0.5), H2 = 2 [R28]
    const d = cascade(6, 1, 0.5, 0.5, 2);
    const t = closedLoop(d, { block: 'r' }, { block: 'y' });
    expectDescending(t.tf.rational.num, [6], 1e-9);
    expectDescending(t.tf.rational.den, [1, 4, 6], 1e-9);
    expect(rootError(t.poles, [cx(-2, Math.SQRT2), cx(-2, -Math.SQRT2)])).toBeLessThanOrEqual(1e-4);
    // Inner loop alone (outer cut opened): a diagram of only C2, G2, H2.
    const innerOnly = diagram(
      [
        ['r', 'source'],
        ['e2', 'summing-junction', { signs: '+-' }],
        ['C2', 'gain', { k: 1 }],
        ['G2', 'first-order-lag', { k: 0.5, tau: 0.5 }],
        ['H2', 'gain', { k: 2 }],
        ['y', 'probe'],
      ],
      ['r->e2.in1', 'e2->C2', 'C2->G2', 'G2->H2', 'H2->e2.in2', 'G2->y'],
    );
    const inner = closedLoop(innerOnly, { block: 'r' }, { block: 'y' });
    expectDescending(inner.tf.rational.num, [1], 1e-9);
    expectDescending(inner.tf.rational.den, [1, 4], 1e-9);
    expect(Math.abs(inner.staticGain - 0.25)).toBeLessThanOrEqual(1e-9);
    expectMethodsAgree(d, 'r', 'y');
  });
});

/** The signal-flow graph of R29/R30 as a diagram: x1 = R + H1·x2 + H2·x3 and x4 = G3·x3 + H3·x5. */
const masonDiagram = (g: [BlockKind, Record<string, ParamValue>][], h: number[]) =>
  diagram(
    [
      ['R', 'source'],
      ['x1', 'summing-junction', { signs: '+++' }],
      ['G1', ...g[0]],
      ['G2', ...g[1]],
      ['G3', ...g[2]],
      ['x4', 'summing-junction', { signs: '++' }],
      ['G4', ...g[3]],
      ['H1', 'gain', { k: h[0] }],
      ['H2', 'gain', { k: h[1] }],
      ['H3', 'gain', { k: h[2] }],
      ['C', 'probe'],
    ],
    [
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
    ],
  );

describe("Mason's gain formula: touching and non-touching loops", () => {
  it('R29: L1 = −1, L2 = −0.6, L3 = −1, P1 = 24, Δ = 5.2, T = 4.6154', () => {
    // Mason (1956) (from memory); Nise, Sec. 5.5 (from memory); instance derived in the reference table [R29]
    const d = masonDiagram(
      [
        ['gain', { k: 2 }],
        ['gain', { k: 3 }],
        ['gain', { k: 1 }],
        ['gain', { k: 4 }],
      ],
      [-0.5, -0.1, -0.25],
    );
    const t = closedLoop(d, { block: 'R' }, { block: 'C' });
    // Every block is a constant gain, so the unnormalised denominator is Mason's Δ itself.
    expect(t.rawDenominator.length).toBe(1);
    expect(Math.abs(t.rawDenominator[0] - 5.2)).toBeLessThanOrEqual(1e-9);
    expect(Math.abs(t.rawNumerator[0] - 24)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(t.staticGain - 4.6154)).toBeLessThanOrEqual(1e-4);
    // The loop gains, each read at a cut (L_cut = −loop gain with the 1 + L convention, the others closed
    // — so read here with the other loops' feedback gains set to zero).
    const only = (h: number[]) =>
      masonDiagram(
        [
          ['gain', { k: 2 }],
          ['gain', { k: 3 }],
          ['gain', { k: 1 }],
          ['gain', { k: 4 }],
        ],
        h,
      );
    expect(Math.abs(-poly.evalReal(loopAtCut(only([-0.5, 0, 0]), 'w8').rational.num, 0) - -1)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(-poly.evalReal(loopAtCut(only([0, -0.1, 0]), 'w10').rational.num, 0) - -0.6)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(-poly.evalReal(loopAtCut(only([0, 0, -0.25]), 'w12').rational.num, 0) - -1)).toBeLessThanOrEqual(1e-4);
  });

  it('R30: T = 6/(s³ + 9s² + 16s + 14), poles −7, −1 ± j; Δ has the factor of the non-touching loop', () => {
    // Derived in the reference table from the formula of R29 [R30]
    // G1 = 1/(s+1), G2 = 2/s, G3 = 1, G4 = 3/(s+4) (first-order lag k = 0.75, tau = 0.25); H = −1.
    const d = masonDiagram(
      [
        ['first-order-lag', { k: 1, tau: 1 }],
        ['integrator', { k: 2 }],
        ['gain', { k: 1 }],
        ['first-order-lag', { k: 0.75, tau: 0.25 }],
      ],
      [-1, -1, -1],
    );
    const t = closedLoop(d, { block: 'R' }, { block: 'C' });
    expectDescending(t.tf.rational.num, [6], 1e-9);
    expectDescending(t.tf.rational.den, [1, 9, 16, 14], 1e-9);
    expect(rootError(t.poles, [cx(-7), cx(-1, 1), cx(-1, -1)])).toBeLessThanOrEqual(1e-6);
    // (1 − L3) = 1 + 3/(s + 4) = (s + 7)/(s + 4): −7 is a closed-loop pole of the whole diagram.
    expect(closedLoopPoles(d).some((p) => cabs(csub(p, cx(-7))) < 1e-6)).toBe(true);
    expectMethodsAgree(d, 'R', 'C');
    // The checks find nothing wrong with it (stable, no algebraic loop, no cancellation).
    expect(checkDiagram(d).filter((f) => f.severity !== 'info')).toEqual([]);
  });
});
