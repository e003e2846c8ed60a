// Discrete PID against row R57 of the verified reference table: backward-difference PID with a
// filtered derivative, Åström & Hägglund, Advanced PID Control (2006), ch. 13 (from memory);
// Åström & Wittenmark, Computer-Controlled Systems (1997), ch. 8 (from memory); instance
// derived in the table.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { poly } from '@loopwright/lti';
import {
  type DiscretePid,
  createControllerState,
  discretizeController,
  filterSequence,
  runController,
  stepController,
} from '@loopwright/sampled';

const near = (a: number, b: number, tol: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(tol);

describe('R57: PID Kp = 2, Ti = 1.5, Td = 0.4, N = 10, T = 0.05 (position form, backward difference)', () => {
  const c = discretizeController({ kind: 'pid', kp: 2, ti: 1.5, td: 0.4, n: 10 }, { sampleTime: 0.05 }) as DiscretePid;
  it('bi = Kp·T/Ti, ad = Tf/(Tf + T), bd = Kp·Td/(Tf + T) with Tf = Td/N', () => {
    near(c.coefficients.bi, 0.066667, 1e-6);
    near(c.coefficients.ad, 0.444444, 1e-6);
    near(c.coefficients.bd, 8.888889, 1e-6);
    near(c.coefficients.bi, 1 / 15, 1e-15);
    near(c.coefficients.ad, 4 / 9, 1e-15);
    near(c.coefficients.bd, 80 / 9, 1e-14);
  });
  it('combined difference equation: b0 = 493/45, b1 = −2794/135, b2 = 88/9, a1 = 1 + ad, a2 = −ad', () => {
    const { b, a } = c.differenceEquation;
    near(b[0], 10.955556, 1e-6);
    near(b[1], -20.696296, 1e-6);
    near(b[2], 9.777778, 1e-6);
    near(b[0], 493 / 45, 1e-13);
    near(b[1], -2794 / 135, 1e-13);
    near(b[2], 88 / 9, 1e-13);
    // u(k) = a1·u(k−1) + a2·u(k−2) + …  ⇔ a[1] = −a1, a[2] = −a2 in our z⁻¹ form.
    near(-a[1], 1.444444, 1e-6);
    near(-a[2], -0.444444, 1e-6);
    expect(a[0]).toBe(1);
  });
  it('the position-form executor, the combined difference equation and the velocity form agree on any input (no limits)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 3, maxLength: 60 }), (e) => {
        const u = runController(c, e);
        const viaEq = filterSequence(c.differenceEquation, e);
        u.forEach((v, k) => expect(Math.abs(v - viaEq[k])).toBeLessThanOrEqual(1e-9 * (1 + Math.abs(v))));
        const { b } = c.differenceEquation;
        const ad = c.coefficients.ad;
        const du = (k: number) => (k < 0 ? 0 : u[k] - (k >= 1 ? u[k - 1] : 0));
        const ee = (k: number) => (k < 0 ? 0 : e[k]);
        for (let k = 0; k < e.length; k++) {
          const vel = ad * du(k - 1) + b[0] * ee(k) + b[1] * ee(k - 1) + b[2] * ee(k - 2);
          expect(Math.abs(du(k) - vel)).toBeLessThanOrEqual(1e-9 * (1 + Math.abs(du(k))));
        }
      }),
    );
  });
  it('C(z) = Kp + bi·z/(z − 1) + bd·(z − 1)/(z − ad): poles at 1 and ad', () => {
    const den = poly.toDescending(c.transfer.rational.den);
    near(den[1], -(1 + 4 / 9), 1e-14);
    near(den[2], 4 / 9, 1e-14);
  });
  it('a unit step in e: u(0) = Kp + bi + bd, then the derivative decays by ad per sample and the integral ramps by bi', () => {
    const s = createControllerState(c);
    const u0 = stepController(c, s, 1);
    near(u0, 2 + 1 / 15 + 80 / 9, 1e-13);
    const u1 = stepController(c, s, 1);
    near(u1, 2 + 2 / 15 + (80 / 9) * (4 / 9), 1e-13);
  });
});
