/**
 * Which reading of a loop to act on (issue 11 item 1): a cascade whose outer loop, with the
 * inner feedback opened, is unstable — so L at the inner cut read with the outer loop closed
 * has open-loop right-half-plane poles — while the whole design is stable. The counts are
 * checked against Routh–Hurwitz and against the Nyquist criterion computed independently
 * (winding of 1 + L(jω) around 0), and the advice says in words which reading to act on.
 */
import { describe, expect, it } from 'vitest';
import { frequencyResponse, poly, routhHurwitz, tfFromCoefficients } from '@loopwright/lti';
import { loopsStudy } from './loops.ts';
import { loopAdvice } from './loop-advice.ts';
import { build } from './testing.ts';

/**
 * Cascade of our own: r → e1(+−) → C1 = 2 → e2(+−) → C2 = 5 → G2 = 1/(s+1)² → x → G1 = 1/s → y,
 * inner feedback x → e2 (cut "inner"), outer feedback y → e1 (cut "outer").
 * Whole loop: s(s+1)² + C2·s + C1C2 = s³ + 2s² + 6s + 10 (Routh 1, 2, 1, 10: stable).
 * With the inner feedback opened the outer loop is 1 + 10/(s(s+1)²): s³ + 2s² + s + 10 (Routh
 * 1, 2, −4, 10: two right-half-plane roots), so L at the inner cut with the outer loop closed,
 * C2G2/(1 + C1C2G1G2) = 5s/(s³ + 2s² + s + 10), has P = 2 (block-diagram algebra as in R27).
 */
function cascade() {
  return build(
    [
      ['r', 'source', { shape: 'step', amplitude: 1 }],
      ['e1', 'summing-junction', { signs: '+-' }],
      ['c1', 'gain', { k: 2 }],
      ['e2', 'summing-junction', { signs: '+-' }],
      ['c2', 'gain', { k: 5 }],
      ['g2', 'transfer-function', { expression: '1/(s + 1)^2' }],
      ['g1', 'integrator', { k: 1 }],
      ['y', 'probe'],
    ],
    ['r->e1.in1', 'e1->c1', 'c1->e2.in1', 'e2->c2', 'c2->g2', 'g2->g1', 'g1->y', 'fbi:g2->e2.in2', 'fbo:g1->e1.in2'],
    [],
    {
      cuts: [
        { id: 'inner', wire: 'fbi', label: 'inner loop' },
        { id: 'outer', wire: 'fbo' },
      ],
    },
  );
}

/** Right-half-plane roots by Routh–Hurwitz (sign changes of the first column; Nise, Sec. 6.2, from memory) [R10]. */
const routhRhp = (asc: number[]) => routhHurwitz(asc).rhp;

/**
 * Counter-clockwise encirclements of −1 by L(jω), ω from −∞ to ∞: the winding of 1 + L around
 * 0 summed over a dense grid (L strictly proper, so the large arc adds nothing). Nyquist: for
 * a stable closed loop it equals P (Åström & Murray, Feedback Systems, Sec. 9.2, from memory).
 */
function encirclements(num: number[], den: number[]): number {
  const w = Array.from({ length: 40001 }, (_, i) => 10 ** (-4 + (8 * i) / 40000));
  const fr = frequencyResponse(tfFromCoefficients(num, den), w);
  let turn = 0;
  let prev = Math.atan2(fr.im[0], 1 + fr.re[0]);
  for (let i = 1; i < w.length; i++) {
    const a = Math.atan2(fr.im[i], 1 + fr.re[i]);
    let d = a - prev;
    if (d > Math.PI) d -= 2 * Math.PI;
    if (d < -Math.PI) d += 2 * Math.PI;
    turn += d;
    prev = a;
  }
  // ω < 0 mirrors ω > 0 (real coefficients): the whole contour turns twice as far.
  return Math.round((2 * turn) / (2 * Math.PI));
}

describe('the reading to act on', () => {
  const L = loopsStudy(cascade());
  const inner = L.rows.find((r) => r.cutId === 'inner')!;
  const outer = L.rows.find((r) => r.cutId === 'outer')!;

  it('L at the inner cut with the outer loop closed is 5s/(s³ + 2s² + s + 10): two open-loop RHP poles by Routh–Hurwitz, and the engine counts two', () => {
    const den = inner.loop.den.map((c) => c / inner.loop.den[inner.loop.den.length - 1]);
    expect(den).toEqual([expect.closeTo(10, 9), expect.closeTo(1, 9), expect.closeTo(2, 9), expect.closeTo(1, 12)]);
    expect(routhRhp(den)).toBe(2);
    expect(inner.openLoopRhpPoles).toBe(2);
    // The whole diagram is stable (s³ + 2s² + 6s + 10: Routh first column 1, 2, 1, 10).
    expect(routhRhp([10, 6, 2, 1])).toBe(0);
    expect(L.stable).toBe(true);
    expect(inner.margins.closedLoopStable).toBe(true);
  });

  it('Nyquist agrees: L encircles −1 counter-clockwise as many times as it has RHP poles (Z = N + P = 0)', () => {
    expect(encirclements(inner.loop.num, inner.loop.den)).toBe(inner.openLoopRhpPoles);
    expect(encirclements(outer.loop.num, outer.loop.den)).toBe(outer.openLoopRhpPoles);
  });

  it('inner-first (outer loop opened) the inner loop is C2·G2 = 5/(s + 1)²: no RHP pole; the advice says to act on it and why', () => {
    expect(inner.alone).not.toBeNull();
    expect(inner.alone!.opened).toEqual(['outer']);
    expect(inner.alone!.openLoopRhpPoles).toBe(0);
    expect(poly.degree(inner.alone!.loop.den)).toBe(2);
    expect(inner.advice.actOn).toBe('inner-first');
    expect(inner.advice.text).toMatch(/With outer closed, L here has 2 open-loop right-half-plane poles/);
    expect(inner.advice.text).toMatch(/2 counter-clockwise encirclements of −1/);
    expect(inner.advice.text).toMatch(/Act on the inner-first reading \(outer opened: PM /);
    // The outermost loop has one reading, and that is the one.
    expect(outer.alone).toBeNull();
    expect(outer.advice.actOn).toBe('all-closed');
    expect(outer.advice.text).toMatch(/No loop encloses this one/);
  });

  it('one name per loop: the cut label, else its id, in the rows and the names map', () => {
    expect(inner.label).toBe('inner loop');
    expect(outer.label).toBe('outer');
    expect(L.names).toEqual({ inner: 'inner loop', outer: 'outer' });
  });

  it('an unstable closed loop is said first; a loop with no RHP pole reads both margins as margins', () => {
    const m = { ...inner.margins, closedLoopStable: false };
    expect(loopAdvice(m, 0, null, []).text.startsWith('The closed loop is UNSTABLE')).toBe(true);
    const calm = loopAdvice(inner.alone!.margins, 0, { ...inner.alone! }, ['outer']);
    expect(calm.text).toMatch(/^Act on the inner-first reading/);
    expect(calm.text).toMatch(/margin left at this point in operation/);
  });
});
