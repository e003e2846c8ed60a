/**
 * Budgets and exact dead time through the study engine (issue 10 "every analysis ends"; issue 9
 * item 5): a deadline in the context reaches the analyses, which stop with a failed part of
 * reason 'budget' naming what ran out; a cut around an inner loop with a dead time gives L(jω)
 * exactly (the diagram solved at s = jω) and says so.
 */
import { describe, expect, it } from 'vitest';
import { budgetNow, cabs, cdiv, cmul, cx, type Complex } from '@loopwright/lti';
import { runStudies, runStudy } from './study.ts';
import { build } from './testing.ts';

/**
 * A loop around an inner loop that holds a dead time (our own scenario): the outer loop's
 * L(jω) = K1 · K2·G2/(1 + K2·G2·e^(−jωτ)) · 1/(jω), G2 = 1/(jω + 1), written by hand from
 * block-diagram algebra (Nise, Control Systems Engineering, Sec. 5.2 (from memory)).
 */
const K1 = 2;
const K2 = 3;
function nested(tau: number) {
  return build(
    [
      ['r', 'source', { shape: 'step', amplitude: 1 }],
      ['e1', 'summing-junction', { signs: '+-' }],
      ['C1', 'gain', { k: K1 }],
      ['e2', 'summing-junction', { signs: '+-' }],
      ['C2', 'gain', { k: K2 }],
      ['G2', 'first-order-lag', { k: 1, tau: 1 }],
      ['D', 'dead-time', { delay: tau }],
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
}

function byHand(w: number, tau: number): Complex {
  const G2 = cdiv(cx(1), cx(1, w));
  const d = cmul(G2, cx(Math.cos(w * tau), -Math.sin(w * tau)));
  const inner = cdiv(cmul(cx(K2), G2), cx(1 + K2 * d.re, K2 * d.im));
  return cmul(cmul(cx(K1), inner), cdiv(cx(1), cx(0, w)));
}

describe('exact dead time at a cut, through the study', () => {
  it('the outer cut of a loop around an inner dead time: L(jω) equals the closed form at every point, and the data say it was solved at s = jω', () => {
    const tau = 0.2;
    const f = runStudy(nested(tau), { kind: 'cut', cut: 'cutOuter' })!;
    expect(f.frequencyMethod.method).toBe('exact');
    expect(f.frequencyMethod.solved).toBe(true);
    expect(f.delayHandling.mode).toBe('pade');
    expect(f.omega.length).toBeGreaterThan(50);
    f.omega.forEach((w, i) => {
      const want = byHand(w, tau);
      expect(cabs(cx(f.re[i] - want.re, f.im[i] - want.im))).toBeLessThanOrEqual(1e-10 * cabs(want));
    });
    // The loops table reads the same row the same way.
    const L = runStudy(nested(tau), { kind: 'loops', frequency: true });
    const row = L.rows.find((r) => r.cutId === 'cutOuter')!;
    expect(row.frequencyMethod.solved).toBe(true);
    expect(row.frequency).toEqual(f);
  });

  it('a loop without dead time says "rational"', () => {
    const f = runStudy(nested(0), { kind: 'cut', cut: 'cutInner' })!;
    expect(f.frequencyMethod.method).toBe('rational');
  });
});

describe('a deadline in the study context', () => {
  it('past the deadline, the analyses end as failed parts with reason "budget" and a message naming the analysis', () => {
    // Fresh dead times (nothing cached); the deadline has already passed when they start.
    const d = nested(0.2137);
    const parts = runStudies(
      d,
      [{ kind: 'cut', cut: 'cutOuter' }, { kind: 'loops' }, { kind: 'locus', target: { kind: 'block', block: 'C2', field: 'k' } }],
      { deadline: budgetNow() - 1 },
    );
    for (const p of parts) {
      expect(p.ok).toBe(false);
      if (!p.ok) {
        expect(p.reason).toBe('budget');
        expect(p.error).toMatch(/stopped at its time budget/);
      }
    }
  });

  it('with time to spare the same studies succeed', () => {
    const parts = runStudies(nested(0.2139), [{ kind: 'cut', cut: 'cutOuter' }, { kind: 'loops' }], { deadline: budgetNow() + 60_000 });
    expect(parts.every((p) => p.ok)).toBe(true);
  });
});
