import { compileModel, simulate } from '@loopwright/sim';
import { poly, rational, radd, rmul, rdiv, rconst, realize, type Rational } from '@loopwright/lti';
import { expm, matrix, type Matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { buildDiagram } from '@loopwright/sim/testing';

/**
 * LTI diagrams against the exact solution: the closed loop is assembled here as one rational
 * function (block-diagram algebra, T = L/(1 + L)), realised, and its unit-step response taken
 * from the matrix exponential of the augmented matrix [[A, B], [0, 0]] (mathjs expm):
 * x(t) = ∫0^t e^(Aτ) B dτ is its top-right block (Van Loan's block-exponential identity,
 * Golub & Van Loan, Matrix Computations, 4th ed., §9.3 (from memory)). The simulator instead
 * integrates each block's own states with odex, so the two paths share nothing but the diagram.
 */
function exactStep(T: Rational, times: number[]): number[] {
  const { A, B, C, D } = realize(T);
  const n = A.length;
  const M: number[][] = [];
  for (let i = 0; i <= n; i++) {
    const row = new Array<number>(n + 1).fill(0);
    if (i < n) {
      for (let j = 0; j < n; j++) row[j] = A[i][j];
      row[n] = B[i];
    }
    M.push(row);
  }
  // uniform grid: z(t + dt) = e^(M·dt) z(t) with z = [x; 1], exact up to rounding
  const dt = times[1] - times[0];
  times.forEach((t, k) => expect(Math.abs(t - k * dt)).toBeLessThan(1e-12 * Math.max(1, t)));
  const Phi = (expm(matrix(M.map((r) => r.map((v) => v * dt)))) as Matrix).toArray() as number[][];
  let z = new Array<number>(n + 1).fill(0);
  z[n] = 1;
  return times.map((_, k) => {
    if (k > 0) z = Phi.map((row) => row.reduce((acc, v, j) => acc + v * z[j], 0));
    let y = D;
    for (let j = 0; j < n; j++) y += C[j] * z[j];
    return y;
  });
}

const unityFeedback = (L: Rational) => rdiv(L, radd(rconst(1), L));

function maxError(sim: number[], exact: number[]): number {
  let e = 0;
  for (let i = 0; i < sim.length; i++) e = Math.max(e, Math.abs(sim[i] - exact[i]));
  return e;
}

for (const engine of ['exact', 'odex'] as const)
  describe(`LTI diagrams match the matrix-exponential solution (rtol 1e-9, ${engine} engine)`, () => {
    it('PI controller around a second-order plant with a lag in the feedback path', () => {
      // r → (+ −) → PI kp(1 + 1/(ti s)) → k wn²/(s² + 2ζ wn s + wn²) → y, feedback through 1/(0.2 s + 1)
      const kp = 1.2;
      const ti = 1.5;
      const wn = 2;
      const zeta = 0.4;
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1 }],
          ['e', 'summing-junction', { signs: '+-' }],
          ['c', 'pid', { form: 'ideal', kp, ti, td: 0 }],
          ['p', 'second-order', { k: 1, wn, zeta }],
          ['h', 'first-order-lag', { k: 1, tau: 0.2 }],
          ['y', 'probe'],
        ],
        ['r -> e.in1', 'h -> e.in2', 'e -> c', 'c -> p', 'p -> h', 'p -> y'],
      );
      const C = rational([kp / ti, kp], [0, 1]);
      const P = rational([wn * wn], [wn * wn, 2 * zeta * wn, 1]);
      const H = rational([1], [1, 0.2]);
      // Y/R = C·P/(1 + C·P·H)
      const T = rdiv(rmul(C, P), radd(rconst(1), rmul(rmul(C, P), H)));
      const res = simulate(compileModel(d), { until: 15, rtol: 1e-9, atol: 1e-12, outputStep: 0.05, engine });
      expect(res.status).toBe('ok');
      expect(res.engine).toBe(engine);
      const exact = exactStep(T, res.time);
      const final = exact[exact.length - 1];
      expect(Math.abs(final - 1)).toBeLessThan(0.01); // integral action: settles at the reference
      expect(maxError(res.traces.y, exact)).toBeLessThan(1e-6 * Math.abs(final));
    });

    it('cascade: inner P loop around a lag, outer lead–lag around an integrator, expression block in the path', () => {
      // R27-style cascade: outer C1 = lead-lag, inner C2 = 5, G2 = 1/(s+1), G1 = 1/s written as a transfer-function expression
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 2 }],
          ['e1', 'summing-junction', { signs: '+-' }],
          ['c1', 'lead-lag', { k: 2, tLead: 0.5, tLag: 0.1 }],
          ['e2', 'summing-junction', { signs: '+-' }],
          ['c2', 'gain', { k: 5 }],
          ['g2', 'first-order-lag', { k: 1, tau: 1 }],
          ['g1', 'transfer-function', { expression: 'Kg/s' }],
          ['y', 'probe'],
        ],
        ['r -> e1.in1', 'g1 -> e1.in2', 'e1 -> c1', 'c1 -> e2.in1', 'g2 -> e2.in2', 'e2 -> c2', 'c2 -> g2', 'g2 -> g1', 'g1 -> y'],
        [{ name: 'Kg', value: 1 }],
      );
      const C1 = rational([2, 2 * 0.5], [1, 0.1]);
      const inner = unityFeedback(rmul(rconst(5), rational([1], [1, 1])));
      const G1 = rational([1], [0, 1]);
      const T = unityFeedback(rmul(rmul(C1, inner), G1));
      const res = simulate(compileModel(d), { until: 8, rtol: 1e-9, atol: 1e-12, outputStep: 0.02, engine });
      expect(res.status).toBe('ok');
      expect(res.engine).toBe(engine);
      const exact = exactStep(T, res.time).map((v) => 2 * v);
      const final = exact[exact.length - 1];
      expect(maxError(res.traces.y, exact)).toBeLessThan(1e-6 * Math.abs(final));
      // and with another value of the named parameter, from the same compiled model
      const model = compileModel(d);
      const res2 = simulate(model, { until: 8, rtol: 1e-9, atol: 1e-12, outputStep: 0.02, overrides: { Kg: 3 }, engine });
      const T2 = unityFeedback(rmul(rmul(C1, inner), rmul(rconst(3), G1)));
      const exact2 = exactStep(T2, res2.time).map((v) => 2 * v);
      expect(maxError(res2.traces.y, exact2)).toBeLessThan(1e-6 * Math.abs(exact2[exact2.length - 1]));
    });

    it('parallel-form PID kp + ki/s + kd·s/(1 + (kd/kp)·s/n) around a lag pair', () => {
      const kp = 2;
      const ki = 1.5;
      const kd = 0.4;
      const n = 10;
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'step', amplitude: 1, start: 0.5 }],
          ['e', 'summing-junction', { signs: '+-' }],
          ['c', 'pid', { form: 'parallel', kp, ki, kd, n }],
          ['p', 'transfer-function', { expression: '1/((s+1)*(0.3*s+1))' }],
          ['y', 'probe'],
        ],
        ['r -> e.in1', 'p -> e.in2', 'e -> c', 'c -> p', 'p -> y'],
      );
      const Cs = radd(radd(rconst(kp), rational([ki], [0, 1])), rational([0, kd], [1, kd / kp / n]));
      const T = unityFeedback(rmul(Cs, rational([1], poly.mul([1, 1], [1, 0.3]))));
      const res = simulate(compileModel(d), { until: 10.5, rtol: 1e-9, atol: 1e-12, outputStep: 0.05, engine });
      expect(res.status).toBe('ok');
      expect(res.engine).toBe(engine);
      // the step starts at 0.5 s: shift the exact response by ten grid points
      const exact = exactStep(T, res.time.slice(0, res.time.length - 10));
      const sim = res.traces.y.slice(10);
      expect(res.traces.y.slice(0, 11).every((v) => v === 0)).toBe(true);
      expect(maxError(sim, exact)).toBeLessThan(1e-6 * Math.abs(exact[exact.length - 1]));
    });

    it('sinusoidal source into a filtered PID loop (derivative filter states included)', () => {
      const kp = 3;
      const ti = 2;
      const td = 0.3;
      const n = 8;
      const d = buildDiagram(
        [
          ['r', 'source', { shape: 'sinusoid', amplitude: 1, omega: 1.5 }],
          ['e', 'summing-junction', { signs: '+-' }],
          ['c', 'pid', { form: 'ideal', kp, ti, td, n }],
          ['p', 'transfer-function', { expression: '1/((s+1)*(0.5*s+1))' }],
          ['y', 'probe'],
        ],
        ['r -> e.in1', 'p -> e.in2', 'e -> c', 'c -> p', 'p -> y'],
      );
      const Cs = radd(radd(rconst(kp), rational([kp], [0, ti])), rational([0, kp * td], [1, td / n]));
      const P = rational([1], poly.mul([1, 1], [1, 0.5]));
      const T = unityFeedback(rmul(Cs, P));
      // the response to sin(ωt) is the step response of T(s)·ω·s/(s² + ω²) (Laplace: sin ↔ ω/(s² + ω²) = (1/s)·ω·s/(s² + ω²))
      const w = 1.5;
      const TS = rmul(T, rational([0, w], [w * w, 0, 1]));
      const res = simulate(compileModel(d), { until: 10, rtol: 1e-9, atol: 1e-12, outputStep: 0.05, engine });
      expect(res.status).toBe('ok');
      expect(res.engine).toBe(engine);
      const exact = exactStep(TS, res.time);
      const amp = Math.max(...exact.map(Math.abs));
      expect(maxError(res.traces.y, exact)).toBeLessThan(1e-6 * amp);
    });
  });
