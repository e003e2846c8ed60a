import { describe, expect, it } from 'vitest';
import { InputError, cabs, cx, revalComplex, tevalComplex, type Complex } from '@loopwright/lti';
import type { Block, Diagram } from '../document-types.ts';
import { emptyDiagram } from '../document.ts';
import { linearForm } from '../resolve.ts';
import { closedLoop } from '../analysis/reduce.ts';
import { diagramOf } from '../analysis/test-diagrams.ts';
import { assembleStateSpace, evaluateStateSpace } from '../analysis/state-space.ts';
import { blockSpec, visibleParams } from './index.ts';

// The second-order notch N(s) = (s² + 2ζz·ωn·s + ωn²)/(s² + 2ζp·ωn·s + ωn²), gain ζz/ζp at ωn: the form
// given for a notch compensator against a lightly damped resonance in Franklin, Powell & Emami-Naeini,
// Feedback Control of Dynamic Systems, frequency-response design chapter, and as the "two-pole notch"
// in Ellis, Control System Design Guide, filters chapter (both from memory). The −3 dB width is
// derived below exactly; the textbook approximation 2ζp·ωn is its deep-notch limit.

const notch = (params: Block['params']): Block => ({ id: 'n1', kind: 'notch', position: { x: 0, y: 0 }, params });
const D0 = emptyDiagram();
function tfOfBlock(b: Block, d: Diagram = D0) {
  const f = linearForm(d, b);
  if (f.type !== 'transfer') throw new Error(`expected a transfer form, got ${f.type}`);
  return f.tf;
}
const at = (b: Block, w: number) => tevalComplex(tfOfBlock(b), cx(0, w));

// Plain complex arithmetic, written out here independently of lti's rational functions.
const add = (a: Complex, b: Complex) => cx(a.re + b.re, a.im + b.im);
const mul = (a: Complex, b: Complex) => cx(a.re * b.re - a.im * b.im, a.re * b.im + a.im * b.re);
const div = (a: Complex, b: Complex) => {
  const d = b.re * b.re + b.im * b.im;
  return cx((a.re * b.re + a.im * b.im) / d, (a.im * b.re - a.re * b.im) / d);
};

/** N(jω) written out by hand: ((ωn² − ω²) + j·2ζz·ωn·ω) / ((ωn² − ω²) + j·2ζp·ωn·ω). */
function analytic(w: number, wn: number, zz: number, zp: number): Complex {
  const a = wn * wn - w * w;
  const nb = 2 * zz * wn * w;
  const db = 2 * zp * wn * w;
  const d = a * a + db * db;
  return cx((a * a + nb * db) / d, (nb * a - a * db) / d);
}

const CASES = [
  { params: { frequency: 50, frequencyUnit: 'Hz', depth: -20, damping: 0.3 }, wn: 2 * Math.PI * 50, zp: 0.3 },
  { params: { frequency: 1200, frequencyUnit: 'rad/s', depth: -40, damping: 0.05 }, wn: 1200, zp: 0.05 },
  { params: { frequency: 2, frequencyUnit: 'Hz', depth: -6, damping: 1.5 }, wn: 4 * Math.PI, zp: 1.5 },
  { params: { frequency: 0.3, frequencyUnit: 'rad/s', depth: 0, damping: 0.7 }, wn: 0.3, zp: 0.7 },
];

describe('notch filter: frequency response', () => {
  it('matches the analytic form at 241 frequencies over six decades around ωn', () => {
    for (const { params, wn, zp } of CASES) {
      const zz = zp * 10 ** (params.depth / 20);
      const b = notch(params);
      for (let i = 0; i <= 240; i++) {
        const w = wn * 10 ** (-3 + (6 * i) / 240);
        const got = at(b, w);
        const want = analytic(w, wn, zz, zp);
        expect(cabs(cx(got.re - want.re, got.im - want.im)), `${JSON.stringify(params)} at ${w}`).toBeLessThanOrEqual(
          1e-12 * Math.max(1, cabs(want)),
        );
      }
    }
  });

  it('passes DC and high frequencies with gain 1 and has zero phase at ωn', () => {
    for (const { params, wn } of CASES) {
      const b = notch(params);
      const dc = at(b, 0);
      expect(Math.abs(dc.re - 1) + Math.abs(dc.im)).toBeLessThan(1e-14);
      expect(Math.abs(cabs(at(b, 1e4 * wn)) - 1)).toBeLessThan(1e-7);
      expect(Math.abs(at(b, wn).im)).toBeLessThan(1e-12);
    }
  });

  it('a frequency in Hz is the same filter as 2π times it in rad/s', () => {
    const hz = tfOfBlock(notch({ frequency: 7, frequencyUnit: 'Hz', depth: -30, damping: 0.2 }));
    const rad = tfOfBlock(notch({ frequency: 14 * Math.PI, frequencyUnit: 'rad/s', depth: -30, damping: 0.2 }));
    for (const w of [1, 10, 44, 100]) {
      const a = tevalComplex(hz, cx(0, w));
      const r = tevalComplex(rad, cx(0, w));
      expect(cabs(cx(a.re - r.re, a.im - r.im))).toBeLessThan(1e-13);
    }
  });
});

describe('notch filter: depth and width', () => {
  it('its gain at ωn is ζz/ζp = 10^(depth/20), and that is the least gain (grid search)', () => {
    for (const { params, wn } of CASES) {
      const b = notch(params);
      const depth = 10 ** (params.depth / 20);
      expect(Math.abs(cabs(at(b, wn)) - depth)).toBeLessThanOrEqual(1e-12);
      let best = { w: 0, g: Infinity };
      for (let i = 0; i <= 4000; i++) {
        const w = wn * 10 ** (-1 + (2 * i) / 4000);
        const g = cabs(at(b, w));
        if (g < best.g) best = { w, g };
      }
      if (params.depth < 0) expect(Math.abs(best.w / wn - 1)).toBeLessThan(1.2e-3); // grid step 1.15e-3
      expect(best.g).toBeGreaterThanOrEqual(depth - 1e-12);
    }
  });

  // |N|² = ½ ⇔ (ωn² − ω²)² = 4ωn²ω²(ζp² − 2ζz²): the two −3 dB frequencies solve ω² ± βω − ωn² = 0 with
  // β = 2ωn·√(ζp² − 2ζz²), so they are exactly β apart and their product is ωn² (derived here).
  it('its −3 dB band is 2ωn·√(ζp² − 2ζz²) wide, centred geometrically on ωn; ≈ 2ζp·ωn when deep', () => {
    const halfPower = (b: Block, lo: number, hi: number) => {
      const f = (w: number) => cabs(at(b, w)) ** 2 - 0.5;
      const sLo = Math.sign(f(lo));
      for (let k = 0; k < 200; k++) {
        const mid = Math.sqrt(lo * hi);
        if (Math.sign(f(mid)) === sLo) lo = mid;
        else hi = mid;
      }
      return Math.sqrt(lo * hi);
    };
    for (const [depth, zp, wn] of [
      [-20, 0.3, 100],
      [-60, 0.1, 2500],
      [-6, 0.5, 3],
      [-3.5, 0.2, 1],
    ]) {
      const b = notch({ frequency: wn, frequencyUnit: 'rad/s', depth, damping: zp });
      const zz = zp * 10 ** (depth / 20);
      const w1 = halfPower(b, wn * 1e-3, wn);
      const w2 = halfPower(b, wn, wn * 1e3);
      const exact = 2 * wn * Math.sqrt(zp * zp - 2 * zz * zz);
      expect(Math.abs(w2 - w1 - exact)).toBeLessThanOrEqual(1e-9 * wn);
      expect(Math.abs((w1 * w2) / (wn * wn) - 1)).toBeLessThan(1e-10);
      // √(1 − 2(ζz/ζp)²) ≈ 1 − (ζz/ζp)²: the approximation is off by the depth ratio squared, 1e-6 at −60 dB.
      if (depth <= -60) expect(Math.abs(Math.abs((w2 - w1) / (2 * zp * wn) - 1) / 10 ** (depth / 10) - 1)).toBeLessThan(1e-3);
    }
  });
});

describe('notch filter: fields, card and reduction', () => {
  it('refuses a frequency ≤ 0, a depth above 0 dB and a damping ≤ 0, naming the field', () => {
    const bad: [Block['params'], string][] = [
      [{ frequency: 0 }, 'frequency'],
      [{ depth: 3 }, 'depth'],
      [{ damping: 0 }, 'damping'],
      [{ frequencyUnit: 'rpm' }, 'frequencyUnit'],
    ];
    for (const [p, field] of bad) {
      let err: unknown;
      try {
        linearForm(D0, notch(p));
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(InputError);
      expect((err as InputError).message).toContain(`field ${field}`);
    }
  });

  it('takes expressions over the named parameters, and says the unit the frequency is in', () => {
    const d: Diagram = { ...D0, parameters: [{ name: 'fRes', value: 40 }] };
    const b = notch({ frequency: 'fRes', frequencyUnit: 'Hz', depth: -20, damping: 0.25 });
    expect(cabs(tevalComplex(tfOfBlock(b, d), cx(0, 80 * Math.PI)))).toBeCloseTo(0.1, 12);
    expect(blockSpec('notch').card(b.params).caption).toBe('fRes Hz, -20 dB, ζp 0.25');
    const card = blockSpec('notch').card({ frequency: 10, frequencyUnit: 'rad/s', depth: -20, damping: 0.5 });
    // 2ζz·ωn = 2·0.05·10 = 1, 2ζp·ωn = 10, ωn² = 100; width 2·10·√(0.25 − 0.005) = 9.899
    expect(card).toEqual({ formula: '(s^2 + 1*s + 100)/(s^2 + 10*s + 100)', caption: '10 rad/s, -20 dB, -3 dB width 9.899 rad/s' });
    expect(visibleParams('notch', {}).map((p) => p.name)).toEqual(['frequency', 'frequencyUnit', 'depth', 'damping']);
  });

  it('in a speed loop: both reduction methods give C·N·G/(1 + C·N·G) with a lightly damped resonance', () => {
    // Speed loop (common practice, no source): r → e → PI → notch → resonant mechanics → ω, unity feedback.
    const G = (s: Complex) => div(cx(2000 * 9e4), mul(s, add(add(mul(s, s), mul(cx(12), s)), cx(9e4))));
    const d = diagramOf(
      [
        ['r', 'source'],
        ['e', 'summing-junction', { signs: '+-' }],
        ['c', 'pid', { form: 'ideal', kp: 0.05, ti: 0.05, td: 0 }],
        ['n1', 'notch', { frequency: 300, frequencyUnit: 'rad/s', depth: -30, damping: 0.4 }],
        ['g', 'transfer-function', { expression: '2000*9e4/(s*(s^2 + 12*s + 9e4))' }],
        ['y', 'probe'],
      ],
      ['r->e.in1', 'e->c', 'c->n1', 'n1->g', 'g->y', 'g->e.in2'],
    );
    const zz = 0.4 * 10 ** (-30 / 20);
    const a = closedLoop(d, { block: 'r' }, { block: 'g' });
    const sys = assembleStateSpace(d, { block: 'r' }, { block: 'g' });
    for (const w of [3, 50, 280, 300, 320, 2000]) {
      const s = cx(0, w);
      const c = cx(0.05, -0.05 / (0.05 * w)); // kp·(1 + 1/(ti·s)) at s = jω
      const l = mul(mul(c, analytic(w, 300, zz, 0.4)), G(s));
      const t = div(l, add(cx(1), l));
      const va = revalComplex(a.tf.rational, s);
      const vb = evaluateStateSpace(sys, s);
      expect(cabs(cx(va.re - t.re, va.im - t.im)), `elimination at ${w}`).toBeLessThanOrEqual(1e-9 * Math.max(1, cabs(t)));
      expect(cabs(cx(vb.re - t.re, vb.im - t.im)), `state space at ${w}`).toBeLessThanOrEqual(1e-9 * Math.max(1, cabs(t)));
    }
  });
});
