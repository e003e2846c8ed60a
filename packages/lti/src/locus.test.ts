import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { eigs } from 'mathjs';
import { type Complex, cabs, cx } from './complex.ts';
import { InputError } from './errors.ts';
import * as P from './poly.ts';
import { gainAtPoint, nearestLocusPoint, rootLocus, type RootLocus } from './locus.ts';

const fd = P.fromDescending;

/** |D(s) + k·N(s)| relative to the size of its terms: 0 for an exact closed-loop pole. */
function relResidual(num: readonly number[], den: readonly number[], s: Complex, k: number): number {
  const d = P.evalComplex(den, s);
  const n = P.evalComplex(num, s);
  const r = Math.hypot(d.re + k * n.re, d.im + k * n.im);
  const r1 = cabs(s);
  let size = 0;
  for (let i = den.length - 1; i >= 0; i--) size = size * r1 + Math.abs(den[i]) + Math.abs(k * (num[i] ?? 0));
  return r === 0 ? 0 : r / size;
}

/** Roots by an independent library: mathjs eigs of the companion matrix. */
function mathjsRoots(p: readonly number[]): Complex[] {
  const c = P.trim(p);
  const n = c.length - 1;
  const m: number[][] = [];
  for (let i = 0; i < n; i++) m.push(new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) m[0][j] = -c[n - 1 - j] / c[n];
  for (let i = 1; i < n; i++) m[i][i - 1] = 1;
  // Diagonal similarity scaling (balancing, powers of 2) so mathjs' QR iteration converges.
  for (let sweep = 0; sweep < 50; sweep++) {
    let changed = false;
    for (let i = 0; i < n; i++) {
      let c = 0;
      let r = 0;
      for (let j = 0; j < n; j++)
        if (j !== i) {
          c += Math.abs(m[j][i]);
          r += Math.abs(m[i][j]);
        }
      if (c === 0 || r === 0) continue;
      const f = 2 ** Math.round(Math.log2(Math.sqrt(r / c)));
      if (f === 1) continue;
      changed = true;
      for (let j = 0; j < n; j++) {
        m[i][j] /= f;
        m[j][i] *= f;
      }
    }
    if (!changed) break;
  }
  const vals = eigs(m, { eigenvectors: false }).values as unknown as (number | { re: number; im: number })[];
  return (Array.isArray(vals) ? vals : (vals as { toArray(): never[] }).toArray()).map((v) =>
    typeof v === 'number' ? cx(v) : cx(v.re, v.im),
  );
}

function matchDistance(a: Complex[], b: Complex[]): number {
  const left = b.slice();
  let worst = 0;
  for (const z of a) {
    let best = 0;
    for (let j = 1; j < left.length; j++)
      if (cabs({ re: left[j].re - z.re, im: left[j].im - z.im }) < cabs({ re: left[best].re - z.re, im: left[best].im - z.im })) best = j;
    worst = Math.max(worst, Math.hypot(left[best].re - z.re, left[best].im - z.im) / (1 + cabs(z)));
    left.splice(best, 1);
  }
  return worst;
}

/** Random loops: poles and zeros on a half-integer lattice (so coincidences and repeated roots happen). */
const rootSet = (min: number, max: number) =>
  fc
    .array(fc.record({ re: fc.integer({ min: -10, max: 6 }), im: fc.integer({ min: 0, max: 8 }) }), { minLength: min, maxLength: max })
    .map((rs) => rs.flatMap((r) => (r.im === 0 ? [cx(r.re / 2)] : [cx(r.re / 2, r.im / 2), cx(r.re / 2, -r.im / 2)])));
const loopArb = fc
  .record({ poles: rootSet(1, 4), zeros: rootSet(0, 3), gain: fc.constantFrom(1, -1, 2.5, -0.5), negative: fc.boolean() })
  .filter((x) => x.zeros.length <= x.poles.length && x.poles.length <= 7)
  .map((x) => ({ num: P.fromRoots(x.zeros, x.gain), den: P.fromRoots(x.poles), negative: x.negative }));

describe('rootLocus input checks', () => {
  it('rejects an improper loop, naming it', () => {
    expect(() => rootLocus([1, 0, 1], [1, 1])).toThrow(InputError);
    expect(() => rootLocus([1, 0, 1], [1, 1])).toThrow(/improper/);
  });
  it('rejects a reversed gain range and a zero numerator', () => {
    expect(() => rootLocus([1], [0, 1, 1], { kMin: 5, kMax: 2 })).toThrow(/reversed/);
    expect(() => rootLocus([0], [0, 1, 1])).toThrow(InputError);
    expect(() => rootLocus([1], [0, 1, 1], { kMin: -1 })).toThrow(/kMin/);
  });
  it('rejects orders above 60', () => {
    const den = new Array<number>(62).fill(1);
    expect(() => rootLocus([1], den)).toThrow(/above the limit of 60/);
  });
});

describe('rootLocus shapes', () => {
  it('handles a constant numerator (no zeros): all branches go along asymptotes', () => {
    // 1/(s(s+1)(s+2)): three asymptotes at ±60°, 180° (Ogata, Example 6-1 (from memory)).
    const L = rootLocus([1], fd([1, 3, 2, 0]));
    expect(L.zeros).toHaveLength(0);
    expect(L.branches).toHaveLength(3);
    for (const br of L.branches) expect(cabs(br[br.length - 1].s)).toBeGreaterThan(10);
  });
  it('n = m: every branch ends at a finite zero', () => {
    // (s+3)(s+5)/((s+1)(s+2)) for k > 0: the real-axis rule puts the locus on [−2,−1] ∪ [−5,−3] (Ogata, Sec. 6-2 rules (from memory)).
    const L = rootLocus(P.fromRoots([cx(-3), cx(-5)]), P.fromRoots([cx(-1), cx(-2)]));
    expect(L.asymptotes.centroid).toBeNull();
    expect(L.realAxisSegments).toEqual(
      [
        { from: -5, to: -3 },
        { from: -2, to: -1 },
      ].map((x) => expect.objectContaining({ from: expect.closeTo(x.from, 9), to: expect.closeTo(x.to, 9) })),
    );
    const ends = L.branches.map((b) => b[b.length - 1].s.re).sort((a, b) => a - b);
    expect(ends[0]).toBeCloseTo(-5, 1);
    expect(ends[1]).toBeCloseTo(-3, 1);
  });
  it('n = m with the leading coefficient cancelling: the branch passes through infinity', () => {
    // 1 + k(1 − s)/(s + 1) = 0 ⇒ s = (1 + k)/(k − 1): → −∞ as k → 1⁻, back from +∞, → 1 as k → ∞ (solved by hand).
    const L = rootLocus([1, -1], [1, 1]);
    expect(L.branches.length).toBe(2);
    for (const br of L.branches)
      for (const p of br) expect(Math.abs(p.s.re - (1 + p.k) / (p.k - 1))).toBeLessThan(1e-9 * (1 + Math.abs(p.s.re)));
  });
  it('negative gains trace the complementary locus', () => {
    // k < 0 on 1/(s(s+1)(s+2)): real-axis parts [−2, −1] and [0, ∞) (the complement of R01's), angles 0°, ±120°.
    const L = rootLocus([1], fd([1, 3, 2, 0]), { negative: true });
    expect(L.realAxisSegments.map((s) => [s.from, s.to])).toEqual([
      [expect.closeTo(-2, 9), expect.closeTo(-1, 9)],
      [expect.closeTo(0, 9), Infinity],
    ]);
    expect(L.asymptotes.anglesDeg.slice().sort((a, b) => a - b)).toEqual([-120, 0, 120].map((x) => expect.closeTo(x, 9)));
    for (const br of L.branches) for (const p of br) expect(p.k).toBeLessThanOrEqual(0);
  });
  it('repeated poles: μ departure angles split evenly', () => {
    // k/((s+1)²(s²+2s+5)) → double pole −1; complex poles −1 ± 2j: departure from −1+2j is
    // 180° − 2·90° − 90° = −90° (angle condition, Ogata Sec. 6-2 (from memory)).
    const L = rootLocus([1], P.mul(P.fromRoots([cx(-1), cx(-1)]), [5, 2, 1]));
    const d = L.departures.find((x) => x.at.im > 0)!;
    expect(d.angleDeg).toBeCloseTo(-90, 9);
    expect(d.multiplicity).toBe(1);
    // A doubled complex pair: k/(s²+2s+5)² — 2·θ = 180° − 2·90° (mod 360) ⇒ θ = 0° or 180°.
    const L2 = rootLocus([1], P.pow([5, 2, 1], 2));
    const d2 = L2.departures.find((x) => x.at.im > 0)!;
    expect(d2.multiplicity).toBe(2);
    expect(d2.anglesDeg.map((a) => Math.abs(a)).sort((a, b) => a - b)).toEqual([expect.closeTo(0, 6), expect.closeTo(180, 6)]);
  });
});

describe('rootLocus traces against an independent root finder', () => {
  it('every sampled pole set equals mathjs eigs of D + kN (10 poles, 4 zeros) and solves D + kN = 0', () => {
    const den = P.fromRoots([cx(0), cx(-1), cx(-2), cx(-3, 2), cx(-3, -2), cx(-5), cx(-6), cx(-7, 1), cx(-7, -1), cx(-10)]);
    const num = P.fromRoots([cx(-1.5), cx(-4), cx(-4.5, 1), cx(-4.5, -1)]);
    const L = rootLocus(num, den, { samples: 120 });
    let compared = 0;
    for (let j = 0; j < L.gains.length; j += 2) {
      const k = L.gains[j];
      const set = L.branches.map((b) => b.find((p) => p.k === k)!.s);
      for (const s of set) expect(relResidual(num, den, s, k)).toBeLessThan(1e-9);
      // mathjs' unbalanced QR may not converge (k·N dwarfing D, or near-double roots at a
      // breakaway): such gains are skipped, the rest compared.
      let ref: Complex[];
      try {
        ref = mathjsRoots(P.add(den, P.scale(num, k)));
      } catch {
        continue;
      }
      expect(matchDistance(set, ref)).toBeLessThan(1e-6);
      compared++;
    }
    expect(compared).toBeGreaterThan(8); // mathjs converged on 12 of the ~80 gains when this was written
  });
  it('recovers the gain at a clicked point', () => {
    const den = fd([1, 3, 2, 0]);
    const L = rootLocus([1], den);
    // A point on the upper branch near k = 6 (crossing at j√2, R03): click slightly off it.
    const hit = nearestLocusPoint(L, cx(0.01, Math.SQRT2))!;
    expect(hit.distance).toBeLessThan(0.05);
    expect(Math.abs(hit.k - 6)).toBeLessThan(0.3);
    expect(gainAtPoint([1], den, cx(0, Math.SQRT2))).toBeCloseTo(6, 9); // −D(j√2) = 6 by hand
  });
});

describe('rootLocus properties (fast-check, 1000 random loops)', () => {
  // One locus per run, three properties checked on it (plain comparisons in the loops keep it fast).
  it('special points solve D + kN = 0; branches continuous within the bound; pole sets conjugate-symmetric', () => {
    fc.assert(
      fc.property(loopArb, (x) => {
        const L = rootLocus(x.num, x.den, { negative: x.negative, samples: 40 });
        // (1) every breakaway and crossing satisfies D + kN = 0 with its reported k, of the locus's sign.
        for (const b of L.breakaways) {
          if (!(relResidual(x.num, x.den, b.s, b.gain) < 1e-8)) return false;
          if (Math.sign(b.gain) !== (x.negative ? -1 : 1)) return false;
        }
        for (const c of L.crossings) if (!(relResidual(x.num, x.den, cx(0, c.omega), c.gain) < 1e-8)) return false;
        // (2) continuity within the reported adaptive bound; |k| strictly increasing along a branch.
        const { fraction, scale } = L.stepBound;
        for (const br of L.branches) {
          for (let i = 1; i < br.length; i++) {
            const a = br[i - 1].s;
            const b = br[i].s;
            if (Math.hypot(a.re - b.re, a.im - b.im) > fraction * (cabs(a) + scale) * (1 + 1e-9)) return false;
            if (!(Math.abs(br[i].k) > Math.abs(br[i - 1].k))) return false;
          }
        }
        if (!specialMembers(L)) return false;
        // (3) conjugate symmetry of the closed-loop pole set at every sampled gain.
        const byGain = new Map<number, Complex[]>();
        for (const br of L.branches) for (const p of br) byGain.set(p.k, [...(byGain.get(p.k) ?? []), p.s]);
        for (const set of byGain.values()) {
          if (
            !(
              matchDistance(
                set,
                set.map((z) => cx(z.re, -z.im)),
              ) < 1e-12
            )
          )
            return false;
        }
        return true;
      }),
      { numRuns: 1000 },
    );
  });
});

/** Every breakaway and crossing inside the traced range is a member of some branch, at its exact gain. */
function specialMembers(L: RootLocus): boolean {
  const [k0, k1] = L.kRange.map(Math.abs).sort((a, b) => a - b);
  const kStar = L.degreeDropGain === null ? NaN : Math.abs(L.degreeDropGain);
  const inGap = (k: number) => Math.abs(Math.abs(k) - kStar) <= 1e-3 * kStar;
  const has = (s: Complex, k: number) =>
    inGap(k) || L.branches.some((br) => br.some((p) => p.k === k && p.s.re === s.re && p.s.im === s.im));
  for (const b of L.breakaways) if (Math.abs(b.gain) >= k0 && Math.abs(b.gain) <= k1 && !has(b.s, b.gain)) return false;
  for (const c of L.crossings) if (Math.abs(c.gain) >= k0 && Math.abs(c.gain) <= k1 && !has(cx(0, c.omega), c.gain)) return false;
  return true;
}
