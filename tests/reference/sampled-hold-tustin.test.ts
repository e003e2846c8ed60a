// Zero-order-hold equivalents, Tustin forms and the hold's frequency response against closed
// forms. Rows R54, R55, R56, R58 of the verified reference table (values copied here with their
// sources). ZOH equivalent: Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd
// ed., 1998, ch. 4 and 6 (from memory); Ogata, Discrete-Time Control Systems, 2nd ed., 1995,
// ch. 2–3 (from memory). Tustin and prewarping: Franklin, Powell & Workman, ch. 6; Åström &
// Wittenmark, Computer-Controlled Systems, 3rd ed., 1997, ch. 8 (both from memory).
import { describe, expect, it } from 'vitest';
import { type Complex, cabs, carg, cx, poly, revalComplex, tfFromCoefficients } from '@loopwright/lti';
import {
  type DiscreteTransferFunction,
  discreteStepResponse,
  dtFrequencyValue,
  holdEquivalent,
  holdResponse,
  tustin,
  tustinConstant,
} from '@loopwright/sampled';

const fd = poly.fromDescending;
const DEG = 180 / Math.PI;
/** Coefficients highest power first, denominator monic (as the table writes them). */
const desc = (h: DiscreteTransferFunction) => ({ num: poly.toDescending(h.rational.num), den: poly.toDescending(h.rational.den) });
const close = (got: readonly number[], want: readonly number[], tol: number) => {
  expect(got.length).toBe(want.length);
  got.forEach((g, i) => expect(Math.abs(g - want[i])).toBeLessThanOrEqual(tol));
};

describe('R54: zero-order-hold equivalents G(z) = (1 − z⁻¹)·Z{G(s)/s}', () => {
  it('(a) 1/(s + 2), T = 0.1: ((1 − e^(−aT))/a)/(z − e^(−aT)) = 0.090635/(z − 0.818731)', () => {
    const a = 2;
    const T = 0.1;
    const h = desc(holdEquivalent(tfFromCoefficients([1], [a, 1]), T));
    close(h.num, [(1 - Math.exp(-a * T)) / a], 1e-12);
    close(h.den, [1, -Math.exp(-a * T)], 1e-12);
    close(h.num, [0.090635], 1e-6);
    close(h.den, [1, -0.818731], 1e-6);
  });
  it('(b) 1/s², T = 0.5: T²(z + 1)/(2(z − 1)²) = (0.125z + 0.125)/(z² − 2z + 1), exact', () => {
    const T = 0.5;
    const h = desc(holdEquivalent(tfFromCoefficients([1], [0, 0, 1]), T));
    close(h.num, [(T * T) / 2, (T * T) / 2], 1e-15);
    close(h.den, [1, -2, 1], 1e-15);
  });
  it('(c) 1/(s(s + 1)), T = 1: (0.367879z + 0.264241)/(z² − 1.367879z + 0.367879)', () => {
    const T = 1;
    const e = Math.exp(-T);
    const h = desc(holdEquivalent(tfFromCoefficients([1], [0, 1, 1]), T));
    close(h.num, [T - 1 + e, 1 - e - T * e], 1e-12);
    close(h.den, [1, -(1 + e), e], 1e-12);
    close(h.num, [0.367879, 0.264241], 1e-6);
    close(h.den, [1, -1.367879, 0.367879], 1e-6);
  });
  it('cross-check: the discrete step response equals the continuous one at t = kT (analytic responses)', () => {
    // (a): y(t) = (1 − e^(−at))/a; (c): y(t) = t − 1 + e^(−t) (inverse Laplace of 1/(s²(s + 1))).
    const ya = discreteStepResponse(holdEquivalent(tfFromCoefficients([1], [2, 1]), 0.1), 60);
    ya.forEach((y, k) => expect(Math.abs(y - (1 - Math.exp(-2 * k * 0.1)) / 2)).toBeLessThanOrEqual(1e-12));
    const yc = discreteStepResponse(holdEquivalent(tfFromCoefficients([1], [0, 1, 1]), 1), 30);
    yc.forEach((y, k) => expect(Math.abs(y - (k - 1 + Math.exp(-k)))).toBeLessThanOrEqual(1e-11 * (1 + k)));
  });
  it('fractional dead time (modified z-transform): e^(−θs)/(s + a), θ = 2T + τ, equals the derived closed form and the delayed continuous step', () => {
    // Derived here from the hold state-space form: H = z^(−2)·(Γ0 z + Γ1)/(z(z − e^(−aT))),
    // Γ0 = (1 − e^(−a(T−τ)))/a, Γ1 = (e^(−a(T−τ)) − e^(−aT))/a; continuous step: (1 − e^(−a(t−θ)))/a for t > θ.
    const a = 3;
    const T = 0.2;
    const tau = 0.07;
    const theta = 2 * T + tau;
    const H = holdEquivalent(tfFromCoefficients([1], [a, 1], theta), T);
    const g0 = (1 - Math.exp(-a * (T - tau))) / a;
    const g1 = (Math.exp(-a * (T - tau)) - Math.exp(-a * T)) / a;
    const want = { num: [g0, g1], den: poly.toDescending(poly.mul([-Math.exp(-a * T), 1], [0, 0, 0, 1])) };
    const got = desc(H);
    close(got.num, want.num, 1e-12);
    close(got.den, want.den, 1e-12);
    const y = discreteStepResponse(H, 40);
    y.forEach((v, k) => {
      const t = k * T;
      expect(Math.abs(v - (t > theta ? (1 - Math.exp(-a * (t - theta))) / a : 0))).toBeLessThanOrEqual(1e-12);
    });
  });
});

describe('R58: the hold with the sampler’s 1/T, H(jω) = e^(−jωT/2)·sin(ωT/2)/(ωT/2)', () => {
  it('T = 0.1, ω = 5: phase −14.324°, magnitude 0.98962', () => {
    const h = holdResponse(5, 0.1);
    expect(Math.abs(carg(h) * DEG - -14.324)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(cabs(h) - 0.98962)).toBeLessThanOrEqual(1e-5);
    expect(Math.abs(carg(h) - -0.25)).toBeLessThanOrEqual(1e-15); // half a sample of lag: ωT/2
  });
  it('T = 0.1 at a quarter of the sampling frequency: phase −45°, magnitude exactly 2√2/π = 0.90032', () => {
    const h = holdResponse(Math.PI / (2 * 0.1), 0.1);
    expect(Math.abs(carg(h) * DEG - -45)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(cabs(h) - 0.90032)).toBeLessThanOrEqual(1e-5);
    expect(Math.abs(cabs(h) - (2 * Math.SQRT2) / Math.PI)).toBeLessThanOrEqual(1e-15);
  });
  it('equals (1 − e^(−jωT))/(jωT) evaluated directly', () => {
    for (const w of [0.3, 7, 20, 31]) {
      const T = 0.1;
      const num = cx(1 - Math.cos(w * T), Math.sin(w * T));
      const direct = { re: num.im / (w * T), im: -num.re / (w * T) };
      const h = holdResponse(w, T);
      expect(Math.abs(h.re - direct.re) + Math.abs(h.im - direct.im)).toBeLessThanOrEqual(1e-14);
    }
  });
});

const at = (h: DiscreteTransferFunction, w: number): Complex => dtFrequencyValue(h, w);

describe('R55: PI 2(1 + 1/(3s)), T = 0.5, Tustin and prewarped Tustin', () => {
  const C = tfFromCoefficients([2 / 3, 2], [0, 1]);
  const T = 0.5;
  it('Tustin: (Kc(1 + T/(2Ti))z − Kc(1 − T/(2Ti)))/(z − 1), exact 13/6 and −11/6', () => {
    const h = desc(tustin(C, T));
    close(h.num, [13 / 6, -11 / 6], 1e-14);
    close(h.den, [1, -1], 1e-15);
    close(h.num, [2.166667, -1.833333], 1e-6);
  });
  it('prewarped at ω1 = 2: constant 3.660975; C(z) = (2.182101z − 1.817899)/(z − 1); C(e^(jω1T)) = C(jω1) = 2 − 0.333333j', () => {
    expect(Math.abs(tustinConstant(T, 2) - 3.660975)).toBeLessThanOrEqual(1e-6);
    const hp = tustin(C, T, { prewarp: 2 });
    close(desc(hp).num, [2.182101, -1.817899], 1e-6);
    close(desc(hp).den, [1, -1], 1e-15);
    const cont = revalComplex(C.rational, cx(0, 2));
    expect(Math.abs(cont.re - 2)).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(cont.im - -1 / 3)).toBeLessThanOrEqual(1e-12);
    const v = at(hp, 2);
    expect(Math.abs(v.re - cont.re) + Math.abs(v.im - cont.im)).toBeLessThanOrEqual(1e-12);
    const plain = at(tustin(C, T), 2);
    expect(Math.abs(plain.re - 2)).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(plain.im - -0.305081)).toBeLessThanOrEqual(1e-6);
  });
});

describe('R56: lead–lag (s + 1)/(0.2s + 1), T = 0.2', () => {
  const C = tfFromCoefficients([1, 1], [1, 0.2]);
  const T = 0.2;
  const w1 = Math.sqrt(5); // frequency of maximum lead: asin(2/3) = 41.81°, |C| = √5
  it('plain Tustin (11z − 9)/(3z − 1) = (3.666667z − 3)/(z − 0.333333); at ω1: phase 41.806°, gain 2.2613', () => {
    const h = tustin(C, T);
    close(desc(h).num, [11 / 3, -3], 1e-14);
    close(desc(h).den, [1, -1 / 3], 1e-15);
    const v = at(h, w1);
    expect(Math.abs(carg(v) * DEG - 41.806)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(cabs(v) - 2.2613)).toBeLessThanOrEqual(1e-4);
  });
  it('prewarped at ω1 = √5: constant 9.832775, C(z) = (3.651635z − 2.977452)/(z − 0.325817), phase 41.810°, gain √5', () => {
    expect(Math.abs(tustinConstant(T, w1) - 9.832775)).toBeLessThanOrEqual(1e-6);
    const h = tustin(C, T, { prewarp: w1 });
    close(desc(h).num, [3.651635, -2.977452], 1e-6);
    close(desc(h).den, [1, -0.325817], 1e-6);
    const v = at(h, w1);
    expect(Math.abs(carg(v) * DEG - 41.81)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(carg(v) - Math.asin(2 / 3))).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(cabs(v) - Math.sqrt(5))).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(cabs(v) - 2.2361)).toBeLessThanOrEqual(1e-4);
  });
  it('prewarping outside 0 < ω1·T < π is an input error naming the field', () => {
    expect(() => tustin(C, T, { prewarp: Math.PI / T })).toThrow(/prewarp/);
    expect(() => tustin(C, T, { prewarp: -1 })).toThrow(/prewarp/);
  });
});

describe('R54 in the continuous limit (identity): the hold equivalent of fd([1, 3, 2, 0]) keeps the step response at kT for every T', () => {
  it('1/(s(s + 1)(s + 2)): y(t) = t/2 − 3/4 + e^(−t) − e^(−2t)/4 at t = kT for T = 0.5, 0.05', () => {
    // Partial fractions of 1/(s²(s + 1)(s + 2)) (derived here).
    const y = (t: number) => t / 2 - 0.75 + Math.exp(-t) - Math.exp(-2 * t) / 4;
    for (const T of [0.5, 0.05]) {
      const r = discreteStepResponse(holdEquivalent(tfFromCoefficients([1], fd([1, 3, 2, 0])), T), 80);
      r.forEach((v, k) => expect(Math.abs(v - y(k * T))).toBeLessThanOrEqual(1e-10 * (1 + k)));
    }
  });
});
