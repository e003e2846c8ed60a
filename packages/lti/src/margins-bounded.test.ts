import { describe, expect, it } from 'vitest';
import { BudgetError, InputError } from './errors.ts';
import { budgetNow, deadlineIn } from './budget.ts';
import { loopMargins } from './margins.ts';
import { parseTransferFunction } from './parse.ts';
import { cabs, cx } from './complex.ts';

/**
 * Every analysis ends (issue 10, items 1 and 2): loops whose phase crossovers never end, extreme
 * but valid numbers. Each case must answer quickly with a small result (the per-test limits are
 * wide because the test machines are shared; `npm run bench` records the real times), and every
 * figure is checked against a closed form.
 */
const LIMIT_MS = 3000;
const SIZE_LIMIT = 100_000; // characters of JSON

function timed(text: string) {
  const t0 = budgetNow();
  const m = loopMargins(parseTransferFunction(text), { deadline: deadlineIn(20000) });
  const ms = budgetNow() - t0;
  const size = JSON.stringify(m).length;
  return { m, ms, size };
}

describe('margins of loops with dead time end, with small output', () => {
  it('2·e^(−s): all crossovers at ω = (2k+1)π with factor 1/2; listed to a stated frequency, the rest infinite; not stable', () => {
    const { m, ms, size } = timed('2*exp(-s)');
    expect(ms).toBeLessThan(LIMIT_MS);
    expect(size).toBeLessThan(SIZE_LIMIT);
    // |L| = 2 everywhere, ∠L = −ω: crossovers where ω = (2k+1)π (derived here).
    m.phaseCrossoverDetails.forEach((c, k) => {
      expect(c.omega).toBeCloseTo((2 * k + 1) * Math.PI, 9);
      expect(c.gainFactor).toBeCloseTo(0.5, 12);
    });
    expect(m.gainMargin).toBeNull();
    expect(m.lowerGainMargin).toBeCloseTo(0.5, 12);
    expect(m.phaseCrossoverTail).not.toBeNull();
    expect(m.phaseCrossoverTail!.infiniteBeyond).toBe(true);
    expect(m.phaseCrossoverTail!.spacing).toBeCloseTo(2 * Math.PI, 12);
    // 1 + 2e^(−s) = 0 ⇔ s = ln 2 + j(2k+1)π: right half-plane roots (derived here).
    expect(m.closedLoopStable).toBe(false);
    expect(m.notes.join(' ')).toMatch(/Re s = 0\.693147/);
  });

  it('e^(−s): |L| ≡ 1 — no isolated gain crossover; gain margin exactly 1 at ω = π; not stable', () => {
    const { m, ms, size } = timed('exp(-s)');
    expect(ms).toBeLessThan(LIMIT_MS);
    expect(size).toBeLessThan(SIZE_LIMIT);
    expect(m.gainCrossovers).toEqual([]);
    expect(m.phaseMarginDeg).toBeNull();
    expect(m.gainMargin).toBeCloseTo(1, 12);
    expect(m.phaseCrossover).toBeCloseTo(Math.PI, 9);
    // 1 + e^(−s) = 0 ⇔ s = j(2k+1)π: on the imaginary axis (derived here).
    expect(m.closedLoopStable).toBe(false);
    expect(m.notes.some((n) => /no isolated gain crossover/.test(n))).toBe(true);
  });

  it('(s+1)/(s+2)·e^(−s): crossovers listed to a stated frequency with a count of the rest; GM 1 approached as ω → ∞', () => {
    const { m, ms, size } = timed('(s+1)/(s+2)*exp(-s)');
    expect(ms).toBeLessThan(LIMIT_MS);
    expect(size).toBeLessThan(SIZE_LIMIT);
    // Each listed crossover satisfies ∠L = −ω + atan ω − atan(ω/2) ≡ −180° and its factor is
    // |2 + jω|/|1 + jω| (derived here).
    for (const c of m.phaseCrossoverDetails) {
      const w = c.omega;
      const phase = -w + Math.atan(w) - Math.atan(w / 2);
      const off = (((phase + Math.PI) % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI);
      expect(Math.min(off, 2 * Math.PI - off)).toBeLessThan(1e-9);
      expect(c.gainFactor).toBeCloseTo(Math.sqrt((4 + w * w) / (1 + w * w)), 9);
    }
    expect(m.phaseCrossoverDetails.length).toBe(100);
    const tail = m.phaseCrossoverTail!;
    expect(tail.listedBelow).toBeGreaterThan(m.phaseCrossovers[99]);
    expect(tail.count).toBeGreaterThan(0);
    expect(tail.infiniteBeyond).toBe(true);
    // The factors fall towards 1 = 1/|L(∞)|: the infimum, approached and not reached.
    expect(m.gainMargin).toBe(1);
    expect(m.phaseCrossover).toBeNull();
    expect(m.notes.join(' ')).toMatch(/approached as ω → ∞/);
    expect(m.closedLoopStable).toBe(false); // |L(∞)| = 1 with dead time: neutral chains reach the axis
  });

  it('e^(−1e5·s)/(s+1): first crossover at ω ≈ π/(1e5 + 1), GM there; stable for every dead time (small gain)', () => {
    const { m, ms, size } = timed('exp(-1e5*s)/(s+1)');
    expect(ms).toBeLessThan(LIMIT_MS);
    expect(size).toBeLessThan(SIZE_LIMIT);
    // ω·1e5 + atan ω = π; Newton from π/(1e5+1) (derived here).
    let w = Math.PI / (1e5 + 1);
    for (let i = 0; i < 5; i++) w -= (w * 1e5 + Math.atan(w) - Math.PI) / (1e5 + 1 / (1 + w * w));
    expect(m.phaseCrossovers[0]).toBeCloseTo(w, 15);
    expect(m.gainMargin! / Math.sqrt(1 + w * w) - 1).toBeLessThan(1e-12);
    expect(m.closedLoopStable).toBe(true);
  });

  it('e^(−1e308·s)/(s+1): a correct answer, not a crash', () => {
    const { m, ms } = timed('exp(-1e308*s)/(s+1)');
    expect(ms).toBeLessThan(LIMIT_MS);
    // First crossover at ω ≈ π/1e308; |L| rounds to 1 there, so GM = 1 to double precision.
    expect(m.phaseCrossovers[0] / (Math.PI / 1e308)).toBeCloseTo(1, 9);
    expect(m.gainMargin).toBeCloseTo(1, 12);
    expect(m.closedLoopStable).toBe(true); // |L(jω)| < 1 for ω > 0: stable whatever the dead time
  });

  it('1e-320 coefficients: a clear answer (no crossover) or a clear InputError', () => {
    const m = loopMargins(parseTransferFunction('1e-320/(s+1)'));
    expect(m.gainMargin).toBeNull();
    expect(m.closedLoopStable).toBe(true);
    expect(() => loopMargins(parseTransferFunction('1/(1e-320*s^3+s+1)'))).toThrow(InputError);
  });

  it('1e-320 + 1/(s + 1): a zero beyond the floating-point range (at −1e320) does not turn the closed-loop pole into NaN', () => {
    // 1 + L = 0 ⇔ (1 + 1e-320)(s + 1) + 1 = 0 ⇔ s = −2 to rounding (derived here). Found by the expression fuzzer.
    const m = loopMargins(parseTransferFunction('1e-320 + 1/(s+1)'));
    expect(m.closedLoopPoles).toHaveLength(1);
    expect(m.closedLoopPoles[0].re).toBeCloseTo(-2, 12);
    expect(m.closedLoopStable).toBe(true);
  });
});

describe('loops the margins refuse or survive', () => {
  it('an improper loop (s²/(s + 1)) is refused with an InputError naming the degrees', () => {
    expect(() => loopMargins(parseTransferFunction('s^2/(s+1)'))).toThrow(/improper \(numerator degree 2 > denominator degree 1\)/);
  });

  it('1e300/(s + 1): no overflow, and the crossover beyond the sweep (|L| = 1e300/√(1 + ω²) = 1 at ω ≈ 1e300) is said to be unsearched, not absent', () => {
    const m = loopMargins(parseTransferFunction('1e300/(s+1)'));
    expect(m.gainCrossover).toBeNull();
    expect(m.notes.join(' ')).toMatch(/where the sweep ends: a gain crossover above it is not searched/);
    expect(m.closedLoopStable).toBe(true); // 1 + 1e300/(s + 1): the pole at −(1 + 1e300)
    // |S| = 1/|1 + L| rises to its supremum 1 only past the crossover: not reported from the sweep.
    expect(m.peakSensitivity).toBeNull();
    expect(m.peakComplementary).toBeNull();
  });

  it('1e300·(s + 1e4)/s²·e^(−0.3s): |L| overflows at low frequency; no figure is NaN (found by the document fuzzer)', () => {
    const m = loopMargins(parseTransferFunction('1e300*(s+1e4)/(s*s)*exp(-0.3*s)'));
    for (const [k, v] of Object.entries(m)) if (typeof v === 'number') expect(Number.isNaN(v), k).toBe(false);
    expect(m.notes.join(' ')).toMatch(/where the sweep ends/);
  });

  it('1e6·(2s + 1)/((s + 3)^5 (s + 1)^4)·e^(−1e308·s): no NaN phase margin where ω·T overflows (found by the expression fuzzer)', () => {
    const m = loopMargins(parseTransferFunction('1e6*(2*s+1)/((s+3)^5*(s+1)^4)*exp(-1e308*s)'));
    for (const [k, v] of Object.entries(m)) if (typeof v === 'number') expect(Number.isNaN(v), k).toBe(false);
    for (const c of m.gainCrossoverDetails) expect(Number.isFinite(c.phaseMarginDeg)).toBe(true);
  });

  it('(−1e-320 + 1/(s + 1))·e^(−1e308·s): a zero beyond the floating-point range with a dead time no Padé form can hold is a clean InputError (found by the expression fuzzer)', () => {
    expect(() => loopMargins(parseTransferFunction('(-1e-320 + 1/(s+1))*exp(-1e308*s)'))).toThrow(InputError);
  });
});

describe('margins of high-order loops', () => {
  it('1/(s+10)^20 reports its true gain margin (10/cos(π/20))^20 ≈ 1.28e20 at ω = 10·tan(π/20)', () => {
    const t0 = budgetNow();
    const m = loopMargins(parseTransferFunction('1/(s+10)^20'));
    expect(budgetNow() - t0).toBeLessThan(LIMIT_MS);
    // 20·atan(ω/10) = π at the phase crossover (derived here).
    expect(m.phaseCrossover!).toBeCloseTo(10 * Math.tan(Math.PI / 20), 9);
    expect(m.gainMargin! / (10 / Math.cos(Math.PI / 20)) ** 20 - 1).toBeLessThan(1e-9);
    expect(m.closedLoopStable).toBe(true);
  });

  it('closed-loop poles of 4/(s+1)^40 lie on |s + 1| = 4^(1/40) at angles (2q+1)π/40, and say how accurate they are', () => {
    const t0 = budgetNow();
    const m = loopMargins(parseTransferFunction('4/(s+1)^40'));
    expect(budgetNow() - t0).toBeLessThan(LIMIT_MS);
    expect(m.closedLoopPoles).toHaveLength(40);
    const r = 4 ** (1 / 40);
    const want = Array.from({ length: 40 }, (_, q) =>
      cx(-1 + r * Math.cos(((2 * q + 1) * Math.PI) / 40), r * Math.sin(((2 * q + 1) * Math.PI) / 40)),
    );
    for (const p of m.closedLoopPoles) {
      const d = Math.min(...want.map((w) => cabs(cx(p.re - w.re, p.im - w.im))));
      expect(d).toBeLessThan(1e-9);
    }
    expect(m.closedLoopAccuracy.limited).toBe(false);
    expect(m.closedLoopAccuracy.worstRelativeError).toBeLessThan(1e-9);
    expect(m.closedLoopStable).toBe(false); // the poles at angle π/40 have Re = −1 + r·cos(π/40) > 0
  });
});

describe('the budget option', () => {
  it('a deadline already passed stops the analysis with a BudgetError naming the cause', () => {
    let err: unknown;
    try {
      loopMargins(parseTransferFunction('(s+1)/(s+2)*exp(-s)'), { deadline: budgetNow() - 1 });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(BudgetError);
    expect((err as BudgetError).budget).toBe(true);
    expect((err as BudgetError).reason).toBe('time');
    expect((err as Error).message).toMatch(/margins: stopped at its time budget/);
  });
});
