// Ziegler–Nichols ultimate-gain tuning applied through the margins: Ku is the gain margin of
// the plant alone (the factor at the phase crossover), ωu the phase crossover, Pu = 2π/ωu.
// Table (Ziegler & Nichols 1942 (from memory); Ogata, Sec. 8-2, Table 8-2):
//   P: Kp = 0.5·Ku;  PI: Kp = 0.45·Ku, Ti = Pu/1.2;  PID: Kp = 0.6·Ku, Ti = 0.5·Pu, Td = 0.125·Pu.
import { describe, expect, it } from 'vitest';
import { exactStepResponse, loopMargins, poly, rational, responseMetrics, tfFromCoefficients } from '@loopwright/lti';

const fd = poly.fromDescending;
const near = (a: number | null, b: number, tol: number) => {
  expect(a).not.toBeNull();
  expect(Math.abs((a as number) - b)).toBeLessThanOrEqual(tol);
};

function ultimate(den: number[]) {
  const m = loopMargins(tfFromCoefficients([1], den));
  const Ku = m.gainMargin!;
  const wu = m.phaseCrossover!;
  return { Ku, wu, Pu: (2 * Math.PI) / wu, m };
}

describe('R34: plant 1/(s(s+2)(s+4)), Ziegler–Nichols table', () => {
  it('Ku = 48 at ωu = 2√2 (Routh s¹ row (48 − K)/6), then P, PI, PID settings', () => {
    // Ziegler & Nichols (1942) (from memory); Ogata, Sec. 8-2, Table 8-2 [R34].
    const { Ku, wu, Pu, m } = ultimate(fd([1, 6, 8, 0]));
    near(Ku, 48, 1e-6);
    near(wu, 2 * Math.SQRT2, 1e-9);
    near(wu, 2.8284, 1e-4);
    near(Pu, 2.2214, 1e-4);
    expect(m.closedLoopStable).toBe(true);
    near(0.5 * Ku, 24, 1e-4);
    near(0.45 * Ku, 21.6, 1e-4);
    near(Pu / 1.2, 1.8512, 1e-4);
    near(0.6 * Ku, 28.8, 1e-4);
    near(0.5 * Pu, 1.1107, 1e-4);
    near(0.125 * Pu, 0.27768, 1e-5);
  });
});

describe('R35: plant 1/(s(s+1)(s+5)), Ziegler–Nichols PID', () => {
  const plantDen = fd([1, 6, 5, 0]);
  const { Ku, wu, Pu } = ultimate(plantDen);
  const Kp = 0.6 * Ku;
  const Ti = 0.5 * Pu;
  const Td = 0.125 * Pu;

  it('Kcr = 30, ωcr = √5, Pcr = 2.8099 s; Kp = 18, Ti = 1.4050 s, Td = 0.35124 s; Gc = 6.3223(s + 1.4235)²/s', () => {
    // Ogata, Sec. 8-2, Example 8-1 (Kcr, Pcr, Kp, Ti, Td, Gc seen in a stored copy of the book page) [R35].
    near(Ku, 30, 1e-4);
    near(wu, Math.sqrt(5), 1e-9);
    near(Pu, 2.8099, 1e-4);
    near(Kp, 18, 1e-4);
    near(Ti, 1.405, 1e-4);
    near(Td, 0.35124, 1e-5);
    // Gc = Kp(1 + 1/(Ti s) + Td s) = Kp·Td·(s + 1/(2Td))²/s because Ti = 4Td.
    near(Kp * Td, 6.3223, 1e-4);
    near(1 / (2 * Td), 1.4235, 1e-4);
  });

  it('closed-loop step: overshoot 61.8 % (book: about 62 %) at tp = 1.668 s, from the exact step response', () => {
    // Gc·G = Kp(Ti Td s² + Ti s + 1)/(Ti s) · 1/(s(s+1)(s+5)); T = GcG/(1 + GcG).
    const cNum = poly.scale([1, Ti, Ti * Td], Kp);
    const cDen = [0, Ti];
    const lNum = cNum;
    const lDen = poly.mul(cDen, plantDen);
    const T = rational(lNum, poly.add(lDen, lNum));
    // The loop must be stable for the step to settle; margins give the verdict via the closed-loop poles.
    expect(loopMargins(tfFromCoefficients(lNum, lDen)).closedLoopStable).toBe(true);
    const t: number[] = [];
    for (let i = 1; i <= 1000; i++) t.push(i * 0.01);
    const y = exactStepResponse(T, t);
    const metrics = responseMetrics([0, ...t], [0, ...y], { finalValue: 1 });
    // Refine the peak by golden section on the exact response around the sampled peak.
    const i0 = y.indexOf(Math.max(...y));
    let a = t[i0] - 0.01;
    let b = t[i0] + 0.01;
    const f = (x: number) => exactStepResponse(T, [x])[0];
    const phi = (Math.sqrt(5) - 1) / 2;
    for (let it = 0; it < 60; it++) {
      const x1 = b - phi * (b - a);
      const x2 = a + phi * (b - a);
      if (f(x1) >= f(x2)) b = x2;
      else a = x1;
    }
    const tp = 0.5 * (a + b);
    const os = 100 * (f(tp) - 1);
    near(os, 61.8, 0.1);
    near(os, 62, 1);
    near(tp, 1.668, 1e-3);
    near(metrics.overshootPct, 61.8, 0.1); // the sampled metrics agree with the refined peak
  });
});
