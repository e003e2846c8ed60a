import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { complex, exp, multiply, divide, add, pow, type Complex as MComplex } from 'mathjs';
import { cx } from './complex.ts';
import { InputError } from './errors.ts';
import * as P from './poly.ts';
import { defaultFrequencyGrid, frequencyEvaluator, frequencyResponse, logspace, roughAtan2 } from './frequency.ts';
import { tfFromCoefficients } from './transfer.ts';

/** G(jω) by mathjs complex arithmetic (an independent evaluation). */
function mathjsValue(num: number[], den: number[], delay: number, w: number): MComplex {
  const s = complex(0, w);
  const ev = (p: number[]) => p.reduce<MComplex>((acc, c, i) => add(acc, multiply(c, pow(s, i) as MComplex)) as MComplex, complex(0, 0));
  return multiply(divide(ev(num), ev(den)), exp(complex(0, -w * delay))) as MComplex;
}

describe('logspace and grids', () => {
  it('logspace hits both ends and is evenly spaced in log10', () => {
    const w = logspace(-2, 3, 6);
    [0.01, 0.1, 1, 10, 100, 1000].forEach((x, i) => expect(Math.abs(w[i] - x) / x).toBeLessThan(1e-14));
    expect(() => logspace(0, 1, 0)).toThrow(InputError);
  });
  it('default grid spans two decades beyond the poles, zeros and 1/T', () => {
    const g = defaultFrequencyGrid(tfFromCoefficients([1, 1], P.fromRoots([cx(-0.3), cx(-40)]), 0.5));
    expect(g[0]).toBeCloseTo(0.001, 12); // 0.3 → decade 0.1 → two below
    expect(g[g.length - 1]).toBeCloseTo(10000, 6); // 40 → decade 100 → two above
  });
});

describe('frequencyResponse', () => {
  it('agrees with mathjs complex evaluation (value and magnitude)', () => {
    const num = [2, 0.5];
    const den = P.fromRoots([cx(-1), cx(-0.2, 3), cx(-0.2, -3)]);
    const w = logspace(-2, 2, 41);
    const r = frequencyResponse(tfFromCoefficients(num, den, 0.3), w);
    w.forEach((x, i) => {
      const ref = mathjsValue(num, den, 0.3, x);
      expect(Math.abs(r.re[i] - ref.re)).toBeLessThan(1e-12 * (1 + Math.hypot(ref.re, ref.im)));
      expect(Math.abs(r.im[i] - ref.im)).toBeLessThan(1e-12 * (1 + Math.hypot(ref.re, ref.im)));
      expect(Math.abs(r.magDb[i] - 20 * Math.log10(Math.hypot(ref.re, ref.im)))).toBeLessThan(1e-9);
    });
  });
  it('anchors the low-frequency phase by the integrators and the sign', () => {
    // 1/s: −90° at every ω; 1/s²: −180°; −1/(s+1): −180° − atan ω; (1 − s)/(1 + s): −2·atan ω (all by hand).
    expect(frequencyResponse(tfFromCoefficients([1], [0, 1]), [1e-3, 1, 1e3]).phaseDeg).toEqual([-90, -90, -90]);
    for (const p of frequencyResponse(tfFromCoefficients([1], [0, 0, 1]), [1e-3, 1, 1e3]).phaseDeg) expect(p).toBeCloseTo(-180, 12);
    const w = [0.1, 1, 10];
    frequencyResponse(tfFromCoefficients([-1], [1, 1]), w).phaseDeg.forEach((p, i) =>
      expect(p).toBeCloseTo(-180 - (Math.atan(w[i]) * 180) / Math.PI, 10),
    );
    frequencyResponse(tfFromCoefficients([1, -1], [1, 1]), w).phaseDeg.forEach((p, i) =>
      expect(p).toBeCloseTo((-2 * Math.atan(w[i]) * 180) / Math.PI, 10),
    );
  });
  it('dead time contributes exactly −ωT, far past −360°', () => {
    const w = [0.5, 10, 100];
    const r = frequencyResponse(tfFromCoefficients([1], [1, 1], 2), w);
    r.phaseDeg.forEach((p, i) => expect(p).toBeCloseTo(((-Math.atan(w[i]) - 2 * w[i]) * 180) / Math.PI, 8));
  });
  it('a lightly damped pair drops the phase by 180° even on a coarse grid', () => {
    // 1/(s² + 0.002s + 1): phase 0° below ω = 1 and → −180° above; the grid step (×10) straddles the resonance.
    const r = frequencyResponse(tfFromCoefficients([1], [1, 0.002, 1]), [0.1, 10]);
    expect(r.phaseDeg[0]).toBeCloseTo(-(Math.atan2(0.0002, 0.99) * 180) / Math.PI, 10);
    expect(r.phaseDeg[1]).toBeCloseTo(-180 + (Math.atan2(0.02, 99) * 180) / Math.PI, 10);
  });
  it('an undamped pair: phase 0° below and −180° above (limit from the left half-plane)', () => {
    const r = frequencyResponse(tfFromCoefficients([1], [1, 0, 1]), [0.5, 2]);
    expect(r.phaseDeg).toEqual([0, -180]);
  });
  it('rejects negative or non-finite frequencies', () => {
    expect(() => frequencyResponse(tfFromCoefficients([1], [1, 1]), [1, -1])).toThrow(/below 0/);
    expect(() => frequencyResponse(tfFromCoefficients([1], [1, 1]), [NaN])).toThrow(InputError);
  });
  it('property: phase is grid-independent and continuous on a dense grid (fast-check)', () => {
    const arb = fc.record({
      poles: fc.array(fc.record({ re: fc.double({ min: -5, max: 5, noNaN: true }), im: fc.double({ min: 0, max: 5, noNaN: true }) }), {
        minLength: 1,
        maxLength: 4,
      }),
      zeros: fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { maxLength: 3 }),
      delay: fc.constantFrom(0, 0.1, 1),
      gain: fc.constantFrom(1, -2),
    });
    fc.assert(
      fc.property(arb, (x) => {
        const roots = x.poles.flatMap((p) => (Math.abs(p.im) < 0.05 ? [cx(p.re)] : [cx(p.re, p.im), cx(p.re, -p.im)]));
        if (roots.some((r) => Math.hypot(r.re, r.im) < 0.05 || (Math.abs(r.re) < 0.05 && r.im !== 0))) return true;
        if (x.zeros.some((z) => Math.abs(z) < 0.05)) return true;
        const tf = tfFromCoefficients(
          P.fromRoots(
            x.zeros.map((z) => cx(z)),
            x.gain,
          ),
          P.fromRoots(roots),
          x.delay,
        );
        const dense = logspace(-2, 2, 2001);
        const r = frequencyResponse(tf, dense);
        // Consecutive samples (ratio 1.0046) move by well under 180°: no wrap jumps.
        for (let i = 1; i < dense.length; i++) if (!(Math.abs(r.phaseDeg[i] - r.phaseDeg[i - 1]) < 90)) return false;
        // A coarse grid gives the same phase at shared points (no dependence on unwrapping history).
        const coarse = frequencyResponse(tf, [dense[0], dense[1000], dense[2000]]);
        return [0, 1000, 2000].every((j, i) => Math.abs(coarse.phaseDeg[i] - r.phaseDeg[j]) < 1e-9);
      }),
      { numRuns: 200 },
    );
  });
});

describe('values at extreme scales', () => {
  it('1/(1e200·s + 1) at ω = 1 is −j·1e-200 to rounding: the complex division does not square 1e200 (Smith 1962, from memory)', () => {
    // 1/(1 + j·1e200) = (1 − j·1e200)/(1 + 1e400) ≈ −j·1e-200 (derived here).
    const r = frequencyResponse(tfFromCoefficients([1], [1, 1e200]), [1]);
    expect(r.im[0] / -1e-200).toBeCloseTo(1, 12);
    expect(Math.abs(r.re[0])).toBeLessThan(1e-300);
  });

  it('1e300·(s + 10)/(s + 0.01) at ω = 1e10, where N(jω) overflows: |G| from the factors (found by the document fuzzer)', () => {
    // |G(jω)| = 1e300·√(ω² + 100)/√(ω² + 1e-4) = 1e300 to 1e-18 at ω = 1e10; phase atan(ω/10) − atan(ω/0.01) ≈ −1e-9 rad (derived here).
    const tf = tfFromCoefficients(P.scale([10, 1], 1e300), [0.01, 1]);
    const r = frequencyResponse(tf, [1e-3, 1, 1e10, 1e200]);
    for (const x of [...r.re, ...r.im, ...r.magDb, ...r.phaseDeg]) expect(Number.isNaN(x)).toBe(false);
    expect(Math.hypot(r.re[2], r.im[2]) / 1e300).toBeCloseTo(1, 12);
    expect(r.magDb[2]).toBeCloseTo(6000, 9);
    expect(Math.abs(r.phaseDeg[2])).toBeLessThan(1e-6);
  });

  it('1/(s + 1e-200): a pole below 1e-154, where |p|² underflows, still gives phase −atan(ω/1e-200) (found by the document fuzzer)', () => {
    // Phase of 1/(jω + a) is −atan(ω/a) (derived here): −45° at ω = a, → −90° above, → 0° below.
    const r = frequencyResponse(tfFromCoefficients([1], [1e-200, 1]), [1e-203, 1e-200, 1e-190, 1]);
    for (const x of [...r.re, ...r.im, ...r.magDb, ...r.phaseDeg]) expect(Number.isNaN(x)).toBe(false);
    expect(r.phaseDeg[0]).toBeCloseTo((-Math.atan(1e-3) * 180) / Math.PI, 9);
    expect(r.phaseDeg[1]).toBeCloseTo(-45, 9);
    expect(r.phaseDeg[2]).toBeCloseTo(-90, 6);
    expect(r.phaseDeg[3]).toBeCloseTo(-90, 9);
  });
});

describe('the rough phase that guides branch choices', () => {
  it('roughAtan2 is within 1.2e-5 rad of Math.atan2 all round the circle and at the axes, zeros and infinities', () => {
    // Abramowitz & Stegun 4.4.49 give |ε| ≤ 1e-5 for arctan on [0, 1] (from memory); with the
    // coefficients as rounded here the worst case over every octant is 1.15e-5.
    let worst = 0;
    for (let i = 0; i <= 200000; i++) {
      const a = -Math.PI + (2 * Math.PI * i) / 200000;
      for (const r of [1e-300, 1, 1e300]) {
        const y = r * Math.sin(a);
        const x = r * Math.cos(a);
        worst = Math.max(worst, Math.abs(roughAtan2(y, x) - Math.atan2(y, x)));
      }
    }
    expect(worst).toBeLessThanOrEqual(1.2e-5);
    expect(worst).toBeGreaterThan(1e-7); // an approximation, not Math.atan2 itself
    for (const [y, x] of [
      [0, 1],
      [0, -1],
      [-0, -1],
      [1, 0],
      [-1, 0],
      [0, 0],
      [Infinity, 1],
      [1, -Infinity],
      [Infinity, Infinity],
      [-Infinity, -Infinity],
    ])
      expect(roughAtan2(y, x)).toBeCloseTo(Math.atan2(y, x), 5);
    expect(Object.is(roughAtan2(-0, 1), -0)).toBe(true);
    expect(Number.isNaN(roughAtan2(NaN, 1))).toBe(true);
  });

  it('phaseGuide follows the evaluated continuous phase to 7e-4° per pole and zero (lightly damped pairs, dead time, integrators)', () => {
    const cases = [
      tfFromCoefficients([2, 1], [0, 1, 0.02, 1]), // (s + 2)/(s (s² + 0.02 s + 1))
      tfFromCoefficients([-1, 0.5], [1, 3, 3, 1]), // RHP zero over (s + 1)³
      { ...tfFromCoefficients([1], [1, 2]), delay: 0.3 },
      tfFromCoefficients([4, 0, 1], [0, 0, 1e-4, 2e-3, 1]), // undamped zero pair, double integrator
    ];
    for (const tf of cases) {
      const g = frequencyEvaluator(tf);
      const bound = 7e-4 * (g.poles.length + g.zeros.length) + 1e-9;
      for (const w of logspace(-3, 3, 3001)) expect(Math.abs(g.phaseGuide(w) - g(w).phaseDeg)).toBeLessThanOrEqual(bound);
    }
  });
});
