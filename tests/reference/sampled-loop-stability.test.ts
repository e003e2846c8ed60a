// Sampled-loop stability against rows R59 and R60 of the verified reference table, and the
// continuous limit of the sampled margins (R21 for the continuous values). Jury test: Jury,
// Theory and Application of the z-Transform Method, Wiley, 1964 (from memory); the R59 loop at
// T = 1 is a stability example in Ogata, Discrete-Time Control Systems (from memory; example
// number and printed value not checked); R60 derived in the table (continuous limit R03).
// GM/PM definitions: Ogata, Sec. 7-6 (from memory).
import { describe, expect, it } from 'vitest';
import { cabs, loopMargins, poly, tfFromCoefficients } from '@loopwright/lti';
import {
  holdEquivalent,
  juryTest,
  pulseMargins,
  sampledLocus,
  sampledMargins,
  unitCircleRootCount,
  zPlaneLocus,
} from '@loopwright/sampled';

const fd = poly.fromDescending;
const near = (a: number | null | undefined, b: number, tol: number) => {
  expect(a).not.toBeNull();
  expect(a).toBeDefined();
  expect(Math.abs((a as number) - b)).toBeLessThanOrEqual(tol);
};
const DEG = 180 / Math.PI;
const E = Math.E;

describe('R59: 1/(s(s + 1)) behind a hold, T = 1, gain K, unity feedback', () => {
  const G = holdEquivalent(tfFromCoefficients([1], [0, 1, 1]), 1);
  const charAt = (K: number) => poly.add(G.rational.den, poly.scale(G.rational.num, K));
  it('characteristic polynomial z² + (0.367879K − 1.367879)z + (0.367879 + 0.264241K)', () => {
    const c = poly.toDescending(charAt(2));
    near(c[1], 0.367879 * 2 - 1.367879, 2e-6);
    near(c[2], 0.367879 + 0.264241 * 2, 2e-6);
  });
  it('Jury: a0 < 1 binds at Kcrit = (e − 1)/(e − 2) = 2.3922; the other limit K < 26.397', () => {
    const kcrit = (E - 1) / (E - 2);
    near(kcrit, 2.3922, 1e-4);
    expect(juryTest(charAt(kcrit * (1 - 1e-6))).stable).toBe(true);
    const above = juryTest(charAt(kcrit * (1 + 1e-6)));
    expect(above.stable).toBe(false);
    expect(above.conditions.find((c) => c.label === '|a_n| < a_0')?.holds).toBe(false);
    const loc = zPlaneLocus(G);
    near(loc.criticalGain, kcrit, 1e-9);
    near(loc.criticalGain, 2.3922, 1e-4);
    const nyq = loc.crossings.find((c) => c.theta === Math.PI);
    near(nyq?.gain, 26.397, 1e-3);
    // 1 − a1 + a0 > 0 ⇔ 2 + 2e⁻¹ + (1 − 3e⁻¹)K > 0 (from the closed form of R54 (c), derived here).
    const e1 = Math.exp(-1);
    near(nyq?.gain, (2 + 2 * e1) / (3 * e1 - 1), 1e-9);
  });
  it('poles at Kcrit: 0.2439 ± 0.9698j on |z| = 1 at angle ωT = 1.3244 rad', () => {
    const loc = zPlaneLocus(G);
    const c = loc.criticalCrossing!;
    near(c.z.re, 0.2439, 1e-4);
    near(c.z.im, 0.9698, 1e-4);
    near(c.theta, 1.3244, 1e-4);
    near(cabs(c.z), 1, 1e-12);
    near(c.omega, c.theta / 1, 1e-15);
  });
  it('K = 1: z² − z + (1 − e^(−1)), poles 0.5 ± 0.6182j, |z| = 0.7951; the sampled margins agree', () => {
    const c = poly.toDescending(charAt(1));
    near(c[1], -1, 1e-12);
    near(c[2], 1 - Math.exp(-1), 1e-12);
    const m = pulseMargins(G);
    expect(m.closedLoopStable).toBe(true);
    expect(m.jury.stable).toBe(true);
    for (const p of m.closedLoopPoles) {
      near(p.re, 0.5, 1e-4);
      near(Math.abs(p.im), 0.6182, 1e-4);
      near(cabs(p), 0.7951, 1e-4);
    }
    // The gain margin is the critical gain; the Nyquist-end phase crossover gives the 26.397 limit.
    near(m.gainMargin, (E - 1) / (E - 2), 1e-9);
    near(m.phaseCrossover, 1.3244, 1e-4);
    expect(m.phaseCrossoverDetails.map((p) => p.gainFactor).some((g) => Math.abs(g - 26.397) < 1e-3)).toBe(true);
  });
  it('Kcrit(T) = (1 − e^(−T))/(1 − e^(−T) − Te^(−T)): T = 0.1 → 20.3389, T = 0.01 → 200.3339 (→ 2/T + 1/3)', () => {
    for (const [T, want] of [
      [0.1, 20.3389],
      [0.01, 200.3339],
    ]) {
      const exact = (1 - Math.exp(-T)) / (1 - Math.exp(-T) - T * Math.exp(-T));
      near(exact, want, 1e-4);
      const loc = zPlaneLocus(holdEquivalent(tfFromCoefficients([1], [0, 1, 1]), T));
      near(loc.criticalGain, exact, 1e-6 * exact);
      near(loc.criticalGain, want, 1e-4);
      near(loc.criticalGain! - 2 / T, 1 / 3, 2 * T);
    }
  });
});

describe('R60: 1/(s(s + 1)(s + 2)) behind a hold: the critical gain tends to the continuous Kcrit = 6 at ω = √2', () => {
  const cases: [number, number, number | null, number][] = [
    [1, 2.6255, 0.8748, 1e-4],
    [0.1, 5.2315, 1.3186, 1e-4],
    [0.01, 5.9115, 1.4037, 1e-4],
    [0.001, 5.991, null, 1e-3],
  ];
  for (const [T, K, w, tol] of cases) {
    it(`T = ${T}: Kcrit = ${K}${w === null ? '' : `, ω = ${w}`}`, () => {
      const loc = sampledLocus({ plant: tfFromCoefficients([1], fd([1, 3, 2, 0])), sampleTime: T });
      near(loc.criticalGain, K, tol);
      if (w !== null) near(loc.criticalCrossing?.omega, w, 1e-4);
      // Bisection on the ZOH equivalent (the table's method): stable just below, not just above.
      const G = holdEquivalent(tfFromCoefficients([1], fd([1, 3, 2, 0])), T);
      const count = (k: number) => unitCircleRootCount(poly.add(G.rational.den, poly.scale(G.rational.num, k)));
      expect(count(loc.criticalGain! * (1 - 1e-4)).outside).toBe(0);
      expect(count(loc.criticalGain! * (1 + 1e-4)).outside).toBeGreaterThan(0);
    });
  }
  it('the limit: |Kcrit(T) − 6| shrinks with T', () => {
    const err = [1, 0.1, 0.01, 0.001].map((T) =>
      Math.abs(sampledLocus({ plant: tfFromCoefficients([1], fd([1, 3, 2, 0])), sampleTime: T }).criticalGain! - 6),
    );
    for (let i = 1; i < err.length; i++) expect(err[i]).toBeLessThan(err[i - 1]);
    expect(err[3]).toBeLessThan(0.01);
  });
});

describe('As T → 0 the sampled margins tend to the continuous ones (R21: L = 4/(s + 1)³)', () => {
  const L = tfFromCoefficients([4], fd([1, 3, 3, 1]));
  const cont = loopMargins(L);
  const Ts = [0.2, 0.1, 0.03, 0.01, 0.003, 0.001];
  const rows = Ts.map((T) => ({ T, m: sampledMargins({ plant: L, sampleTime: T }) }));
  it('continuous values: GM 2 at ω = √3, PM 27.14° at ω = √(4^(2/3) − 1) (R21)', () => {
    near(cont.gainMargin, 2, 1e-9);
    near(cont.phaseMarginDeg, 27.14, 0.01);
  });
  it('GM, PM and the crossovers approach them monotonically, with the first-order terms predicted by the hold’s half-sample lag', () => {
    // First order in T (derived here from R58's half-sample lag e^(−sT/2) on R21's loop):
    // PM ≈ PM0 − ωgc·T/2 (the crossover stays put to first order), and the phase crossover moves
    // by dω = −(ω/2)/(3/(1 + ω²))·T = −(2/√3)·T, where dGM/dω = (3/4)·ω·√(1 + ω²) = 3√3/2, so GM ≈ 2 − 3T.
    // The T² allowances hold the second-order terms; 1e-4° is the rounding floor near z = 1 at T = 0.001.
    const wgc = Math.sqrt(4 ** (2 / 3) - 1);
    const pm0 = cont.phaseMarginDeg!;
    let prev = Infinity;
    for (const { T, m } of rows) {
      expect(m.closedLoopStable).toBe(true);
      const ePM = Math.abs(m.phaseMarginDeg! - pm0);
      expect(ePM).toBeLessThan(prev);
      prev = ePM;
      expect(Math.abs(m.phaseMarginDeg! - (pm0 - wgc * (T / 2) * DEG))).toBeLessThanOrEqual(4 * T * T + 1e-4);
      expect(Math.abs(m.gainMargin! - (2 - 3 * T))).toBeLessThanOrEqual(6 * T * T + 1e-6);
      expect(Math.abs(m.gainCrossover! - wgc)).toBeLessThanOrEqual(T * T);
      expect(Math.abs(m.phaseCrossover! - (Math.sqrt(3) - (2 / Math.sqrt(3)) * T))).toBeLessThanOrEqual(2 * T * T);
    }
    const last = rows[rows.length - 1].m;
    near(last.gainMargin, 2, 4e-3);
    near(last.phaseMarginDeg, 27.14, 0.05);
  });
  it('the continuous estimate (hold as e^(−sT/2)) is closer than the plain continuous figures: error o(T)', () => {
    for (const { T, m } of rows) {
      const est = m.continuousEstimate!.margins;
      expect(m.continuousEstimate!.label).toMatch(/estimate/);
      const eEst = Math.abs(est.phaseMarginDeg! - m.phaseMarginDeg!);
      const eCont = Math.abs(cont.phaseMarginDeg! - m.phaseMarginDeg!);
      expect(eEst).toBeLessThan(eCont);
      expect(eEst).toBeLessThanOrEqual(10 * T * T * DEG + 1e-9);
    }
  });
});
