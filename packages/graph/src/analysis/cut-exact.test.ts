import { describe, expect, it } from 'vitest';
import { type Complex, cabs, cdiv, cmul, cx, frequencyResponse, loopMargins, tfFromCoefficients } from '@loopwright/lti';
import { diagramOf } from './test-diagrams.ts';
import { cutFrequencyData, cutMargins, loopAtCut } from './cuts.ts';
import { analyseLoops } from './loops.ts';
import { add, complex, divide, lusolve, multiply, subtract, type Complex as MComplex } from 'mathjs';
import { exactEvaluator } from './cut-exact.ts';
import { relevantNodes, type SignalGraph } from './points.ts';

/**
 * A loop around an inner loop that holds a dead time (our own scenario): the outer loop's
 * L(jω) = K1 · K2·G2/(1 + K2·G2·e^(−jωτ)) · 1/(jω), written by hand from block-diagram algebra
 * (Nise, Sec. 5.2; Ogata, Sec. 2-3 (from memory)), G2 = 1/(jω + 1).
 */
const K1 = 2;
const K2 = 3;
const TAU = 0.2;
const nested = () =>
  diagramOf(
    [
      ['r', 'source'],
      ['e1', 'summing-junction', { signs: '+-' }],
      ['C1', 'gain', { k: K1 }],
      ['e2', 'summing-junction', { signs: '+-' }],
      ['C2', 'gain', { k: K2 }],
      ['G2', 'first-order-lag', { k: 1, tau: 1 }],
      ['D', 'dead-time', { delay: TAU }],
      ['G1', 'integrator', { k: 1 }],
      ['y', 'probe'],
    ],
    ['r->e1.in1', 'e1->C1', 'C1->e2.in1', 'e2->C2', 'C2->G2', 'G2->D', 'inner:D->e2.in2', 'G2->G1', 'outer:G1->e1.in2', 'G1->y'],
    [],
    {
      cuts: [
        { id: 'cutOuter', wire: 'outer' },
        { id: 'cutInner', wire: 'inner' },
      ],
    },
  );

function byHand(w: number): Complex {
  const s = cx(0, w);
  const G2 = cdiv(cx(1), cx(1, w));
  const delay = cx(Math.cos(w * TAU), -Math.sin(w * TAU));
  const inner = cdiv(cmul(cx(K2), G2), cx(1 + K2 * cmul(G2, delay).re, K2 * cmul(G2, delay).im));
  return cmul(cmul(cx(K1), inner), cdiv(cx(1), s));
}

describe('exact dead time at a cut', () => {
  it('L(jω) of the outer loop equals the closed form, not the Padé approximant', () => {
    const grid = [0.01, 0.1, 0.5, 1, 2, 5, 10, 31.4, 100, 1000];
    const f = cutFrequencyData(nested(), 'outer', undefined, grid);
    expect(f.frequency.method).toBe('exact');
    expect(f.frequency.solved).toBe(true);
    expect(f.frequency.note).toMatch(/Padé \(3,3\) approximant of D stands in only for the closed-loop poles/);
    grid.forEach((w, i) => {
      const want = byHand(w);
      expect(cabs(cx(f.loop.re[i] - want.re, f.loop.im[i] - want.im))).toBeLessThanOrEqual(1e-12 * cabs(want));
    });
    // The Padé approximant that stands in for the poles would not pass: at ω = 31.4 (ωτ ≈ 2π) its
    // phase is far from the dead time's, so its L(jω) differs from the closed form there.
    const approx = frequencyResponse(loopAtCut(nested(), 'outer'), [31.4]);
    const want = byHand(31.4);
    expect(cabs(cx(approx.re[0] - want.re, approx.im[0] - want.im))).toBeGreaterThan(1e-3 * cabs(want));
  });

  it('phase is continuous and matches the closed form modulo 360°', () => {
    const grid = Array.from({ length: 400 }, (_, i) => 10 ** (-2 + (5 * i) / 399));
    const f = cutFrequencyData(nested(), 'outer', undefined, grid);
    for (let i = 1; i < grid.length; i++) expect(Math.abs(f.loop.phaseDeg[i] - f.loop.phaseDeg[i - 1])).toBeLessThan(90);
    // Low frequency: an integrator in the loop starts at −90°.
    expect(f.loop.phaseDeg[0]).toBeCloseTo(-90, 0);
    grid.forEach((w, i) => {
      const want = (Math.atan2(byHand(w).im, byHand(w).re) * 180) / Math.PI;
      const d = ((((f.loop.phaseDeg[i] - want) % 360) + 540) % 360) - 180;
      expect(Math.abs(d)).toBeLessThan(1e-9);
    });
  });

  it('margins from the exact L(jω) agree with a brute-force scan of the closed form', () => {
    const { margins, loop } = cutMargins(nested(), 'outer');
    expect(margins.frequencyMethod).toBe('exact');
    expect(loop.reduction.delayHandling.mode).toBe('pade');
    // Gain crossover: |L| = 1 by bisection on the closed form (|L| falls monotonically here).
    let a = 0.01;
    let b = 100;
    for (let i = 0; i < 200; i++) {
      const m = Math.sqrt(a * b);
      if (cabs(byHand(m)) > 1) a = m;
      else b = m;
    }
    expect(margins.gainCrossover!).toBeCloseTo(a, 9);
    const pm = 180 + (Math.atan2(byHand(a).im, byHand(a).re) * 180) / Math.PI;
    expect(margins.phaseMarginDeg!).toBeCloseTo(pm, 6);
    // Phase crossover: Im L = 0 with Re L < 0 on a fine scan, refined by bisection; GM = 1/|L| there.
    let best: number | null = null;
    const scan = Array.from({ length: 20001 }, (_, i) => 10 ** (-1 + (3 * i) / 20000));
    for (let i = 1; i < scan.length && best === null; i++) {
      const p = byHand(scan[i - 1]);
      const q = byHand(scan[i]);
      if (Math.sign(p.im) !== Math.sign(q.im) && p.re < 0) {
        let lo = scan[i - 1];
        let hi = scan[i];
        for (let k = 0; k < 200; k++) {
          const mid = 0.5 * (lo + hi);
          if (Math.sign(byHand(mid).im) === Math.sign(p.im)) lo = mid;
          else hi = mid;
        }
        best = lo;
      }
    }
    expect(best).not.toBeNull();
    expect(margins.phaseCrossover!).toBeCloseTo(best!, 8);
    expect(margins.gainMargin!).toBeCloseTo(1 / cabs(byHand(best!)), 8);
    // The approximant's own margins differ measurably (that is what the exact evaluation fixes).
    const approx = loopMargins(loop.reduction.tf);
    expect(Math.abs(approx.gainMargin! - margins.gainMargin!)).toBeGreaterThan(1e-6);
  });

  it('a cut whose dead time lies outside the other loops keeps it exact without solving', () => {
    const f = cutFrequencyData(nested(), 'inner', undefined, [0.3, 3]);
    expect(f.frequency).toMatchObject({ method: 'exact', solved: false });
    // L_inner = K2·G2·e^(−sτ)/(1 + K1·K2·G2/s) (Mason: the outer loop touches the path).
    for (const [i, w] of [0.3, 3].entries()) {
      const s = cx(0, w);
      const G2 = cdiv(cx(1), cx(1, w));
      const num = cmul(cmul(cx(K2), G2), cx(Math.cos(w * TAU), -Math.sin(w * TAU)));
      const den = cx(1 + cdiv(cmul(cx(K1 * K2), G2), s).re, cdiv(cmul(cx(K1 * K2), G2), s).im);
      const want = cdiv(num, den);
      expect(cabs(cx(f.loop.re[i] - want.re, f.loop.im[i] - want.im))).toBeLessThanOrEqual(1e-12 * cabs(want));
    }
  });

  it('the loops report says per cut how L(jω) was evaluated', () => {
    const rep = analyseLoops(nested());
    const outer = rep.cuts.find((c) => c.cut === 'cutOuter')!;
    expect(outer.frequency.solved).toBe(true);
    expect(outer.delayHandling.mode).toBe('pade');
    expect(outer.margins.frequencyMethod).toBe('exact');
  });

  it('a loop without dead time is evaluated as a rational function', () => {
    const d = diagramOf(
      [
        ['r', 'source'],
        ['e', 'summing-junction', { signs: '+-' }],
        ['K', 'gain', { k: 4 }],
        ['G', 'transfer-function', { expression: '1/(s+1)^3' }],
        ['y', 'probe'],
      ],
      ['r->e.in1', 'e->K', 'K->G', 'fb:G->e.in2', 'G->y'],
    );
    const { margins, loop } = cutMargins(d, 'fb');
    expect(loop.frequency.method).toBe('rational');
    // 4/(s+1)³: GM = 2 at ω = √3 (R21, derived here from Ogata Sec. 7-6 definitions)
    expect(margins.gainMargin!).toBeCloseTo(2, 9);
    expect(margins.phaseCrossover!).toBeCloseTo(Math.sqrt(3), 9);
    expect(loopMargins(tfFromCoefficients([4], [1, 3, 3, 1])).gainMargin!).toBeCloseTo(margins.gainMargin!, 12);
  });
});

/** A small linear congruential generator: the same graphs on every run. */
function lcg(seed: number) {
  let x = seed >>> 0;
  return () => {
    x = (Math.imul(x, 1664525) + 1013904223) >>> 0;
    return x / 2 ** 32;
  };
}

/**
 * A random signal graph: transfer blocks of order 0–2 (some with dead times), summing nodes and
 * sources, each node but the input fed by one to three branches (self-loops and parallel branches included).
 */
function randomGraph(seed: number): SignalGraph {
  const r = lcg(seed);
  const m = 3 + Math.floor(r() * 12);
  const kinds = Array.from({ length: m }, (_, v) =>
    v === 0 ? ('source' as const) : r() < 0.08 ? ('source' as const) : r() < 0.4 ? ('sum' as const) : ('transfer' as const),
  );
  const coef = () => (0.2 + 2 * r()) * (r() < 0.2 ? -1 : 1);
  const num: number[][] = [];
  const den: number[][] = [];
  const delay: number[] = [];
  for (const k of kinds) {
    const order = k === 'transfer' ? Math.floor(r() * 3) : 0;
    den.push(order === 0 ? [1] : order === 1 ? [0.5 + r(), 0.1 + r()] : [1 + r(), 0.05 + r(), 0.1 + r()]);
    num.push(k === 'transfer' ? Array.from({ length: 1 + Math.floor(r() * (order + 1)) }, coef) : [1]);
    delay.push(k === 'transfer' && r() < 0.25 ? 0.05 + 0.5 * r() : 0);
  }
  const branches: SignalGraph['branches'] = [];
  for (let v = 1; v < m; v++) {
    const count = 1 + Math.floor(r() * 3);
    for (let e = 0; e < count; e++) {
      const from = r() < 0.1 ? v : Math.floor(r() * m);
      branches.push({ wire: `w${branches.length}`, from, to: v, weight: r() < 0.5 ? 1 : r() < 0.5 ? -1 : coef() });
    }
  }
  return { ids: kinds.map((_, v) => `n${v}`), kinds, num, den, delay, branches, input: 0, output: 1 + Math.floor(r() * (m - 1)) };
}

/**
 * The output/input transmission at jω by mathjs: the system (I − G·W) y = e_input over the nodes
 * on some path from the input to the output (the evaluator's definition; a node off every such
 * path, e.g. a summing node fed back to itself alone, may make the whole system singular), every
 * one of them kept.
 */
function denseReference(g: SignalGraph, w: number): MComplex | null {
  const nodes = relevantNodes(g).flatMap((keep, v) => (keep ? [v] : []));
  const at = new Map(nodes.map((v, i) => [v, i]));
  const m = nodes.length;
  const s = complex(0, w);
  const value = (p: readonly number[]) =>
    p.reduceRight((acc: MComplex, c) => add(multiply(acc, s), complex(c, 0)) as MComplex, complex(0, 0));
  const G = nodes.map((v) =>
    g.kinds[v] === 'source'
      ? complex(0, 0)
      : (multiply(divide(value(g.num[v]), value(g.den[v])), complex({ r: 1, phi: -w * g.delay[v] })) as MComplex),
  );
  const A: MComplex[][] = Array.from({ length: m }, (_, i) => Array.from({ length: m }, (_, j) => complex(i === j ? 1 : 0, 0)));
  for (const b of g.branches) {
    const i = at.get(b.to);
    const j = at.get(b.from);
    if (i === undefined || j === undefined) continue;
    A[i][j] = subtract(A[i][j], multiply(G[i], b.weight)) as MComplex;
  }
  const rhs = nodes.map((v) => [complex(v === g.input ? 1 : 0, 0)]);
  try {
    const y = lusolve(A, rhs) as unknown as MComplex[][];
    return y[at.get(g.output)!][0];
  } catch {
    return null; // singular at this frequency: no reference
  }
}

describe('the exact evaluator against a dense solve (mathjs lusolve)', () => {
  it('400 random signal graphs, 5 frequencies each where the output is reached: the same transmission to 1e-9', () => {
    let compared = 0;
    for (let seed = 1; seed <= 400; seed++) {
      const g = randomGraph(seed);
      const ev = exactEvaluator(g);
      // No path from the input to the output: zero (the dense system may be singular there).
      if (!relevantNodes(g)[g.output]) {
        expect(ev(1)).toEqual(cx(0));
        continue;
      }
      for (const w of [0.01, 0.3, 1.7, 9, 140]) {
        const want = denseReference(g, w);
        if (!want || !Number.isFinite(want.re) || cabs(cx(want.re, want.im)) > 1e6) continue;
        const got = ev(w);
        expect(cabs(cx(got.re - want.re, got.im - want.im)), `seed ${seed}, ω ${w}`).toBeLessThanOrEqual(
          1e-9 * Math.max(1, cabs(cx(want.re, want.im))),
        );
        compared++;
      }
    }
    expect(compared).toBeGreaterThan(900);
  });
});
