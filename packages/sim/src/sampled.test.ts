// Sampled controller blocks in the simulator: at the sample instants the simulated loop agrees
// with the exact discrete closed-loop response of its pulse transfer function.
import { describe, expect, it } from 'vitest';
import { diagramOf } from '@loopwright/graph/testing';
import type { ParamValue } from '@loopwright/graph';
import {
  type DiscreteTransferFunction,
  discreteTransfer,
  discretizeController,
  dtMul,
  filterSequence,
  holdEquivalent,
  runController,
} from '@loopwright/sampled';
import { parseTransferFunction, poly as P } from '@loopwright/lti';
import { compileModel, simulate } from './index.ts';

const loop = (ctrl: [string, 'gain' | 'pid' | 'lead-lag', Record<string, ParamValue>], plant: string) =>
  diagramOf(
    [
      ['r', 'source', { shape: 'step', amplitude: 1, start: 0 }],
      ['e', 'summing-junction', { signs: '+-' }],
      ctrl,
      ['G', 'transfer-function', { expression: plant }],
      ['y', 'probe'],
      ['u', 'probe'],
    ],
    ['r->e.in1', `e->${ctrl[0]}`, `${ctrl[0]}->G`, 'fb:G->e.in2', 'G->y', `${ctrl[0]}->u`],
  );

/** y at the instants kT from a run (the output grid holds them: dt divides T). */
function atInstants(time: number[], y: number[], T: number, n: number): number[] {
  const out: number[] = [];
  for (let k = 0; k < n; k++) {
    const i = time.findIndex((t) => Math.abs(t - k * T) <= 1e-9 * T);
    out.push(i < 0 ? NaN : y[i]);
  }
  return out;
}

/** The closed-loop step response y(k) of 1 + G(z) = 0 from the difference equation of G/(1 + G). */
function closedLoopStep(G: DiscreteTransferFunction, n: number): number[] {
  const cl = discreteTransfer(G.rational.num, P.add(G.rational.den, G.rational.num), G.sampleTime);
  return filterSequence(cl, new Array<number>(n).fill(1));
}

describe('sampled blocks in the simulator', () => {
  it('gain K = 1.5 sampled at T = 0.1 before 1/(s(s+1)): y(kT) equals the closed forms of R54 (c) to 1e-9', () => {
    // ZOH equivalent of 1/(s(s+1)): ((T − 1 + e^(−T))z + (1 − e^(−T) − Te^(−T)))/((z − 1)(z − e^(−T)))
    // (Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., ch. 4 (from memory)) [R54 (c)]
    const T = 0.1;
    const K = 1.5;
    const q = Math.exp(-T);
    const b1 = T - 1 + q;
    const b0 = 1 - q - T * q;
    // y(k) = (1 + q − K·b1)·y(k−1) − (q + K·b0)·y(k−2) + K·b1·r(k−1) + K·b0·r(k−2), r = 1 from k = 0
    const n = 60;
    const ref: number[] = [];
    for (let k = 0; k < n; k++) {
      const y1 = ref[k - 1] ?? 0;
      const y2 = ref[k - 2] ?? 0;
      ref.push((1 + q - K * b1) * y1 - (q + K * b0) * y2 + K * b1 * (k >= 1 ? 1 : 0) + K * b0 * (k >= 2 ? 1 : 0));
    }
    const d = loop(['K', 'gain', { k: K, sampleTime: T }], '1/(s*(s+1))');
    for (const engine of ['exact', 'odex'] as const) {
      const run = simulate(compileModel(d), { until: n * T, outputStep: T / 10, engine, rtol: 1e-10, atol: 1e-12 });
      expect(run.status).toBe('ok');
      const got = atInstants(run.time, run.traces.y, T, n);
      const tol = engine === 'exact' ? 1e-9 : 1e-6;
      got.forEach((v, k) => expect(Math.abs(v - ref[k])).toBeLessThan(tol));
      // the controller output is held between instants: constant inside (kT, (k+1)T)
      const u = run.traces.u;
      for (let i = 1; i < run.time.length; i++) {
        const k = Math.floor(run.time[i] / T + 1e-9);
        const j = Math.floor(run.time[i - 1] / T + 1e-9);
        if (k === j) expect(u[i]).toBe(u[i - 1]);
      }
    }
  });

  it('a sampled PI with one sample of computation delay agrees with its pulse transfer function and the executor', () => {
    const T = 0.05;
    const d = loop(['C', 'pid', { kp: 0.8, ti: 0.6, td: 0, sampleTime: T, computeDelay: 1 }], '2/(0.4*s+1)');
    const n = 80;
    const run = simulate(compileModel(d), { until: n * T, outputStep: T / 5, engine: 'exact' });
    const ctrl = discretizeController({ kind: 'pid', kp: 0.8, ti: 0.6, td: 0 }, { sampleTime: T, computeDelay: 1 });
    const G = dtMul(ctrl.transfer, holdEquivalent(parseTransferFunction('2/(0.4*s+1)'), T, { computeDelay: 1 }));
    const ref = closedLoopStep(G, n);
    atInstants(run.time, run.traces.y, T, n).forEach((v, k) => expect(Math.abs(v - ref[k])).toBeLessThan(1e-9));
    // the held output at kT is the executor's u(k − 1) on the sampled error sequence
    const e = atInstants(run.time, run.traces.y, T, n).map((y) => 1 - y);
    const u = runController(ctrl, e);
    atInstants(run.time, run.traces.u, T, n)
      .slice(1)
      .forEach((v, k) => expect(Math.abs(v - u[k])).toBeLessThan(1e-9));
  });

  it('with output limits and anti-windup the held outputs are those of the executor on the sampled errors', () => {
    const T = 0.05;
    const p = { kp: 0.8, ti: 0.6, td: 0.05, umin: -0.3, umax: 0.6, antiWindup: 'back-calculation' as const };
    const d = loop(['C', 'pid', { ...p, sampleTime: T, computeDelay: 1 }], '2/(0.4*s+1)');
    const n = 80;
    const run = simulate(compileModel(d), { until: n * T, outputStep: T / 5 });
    const ctrl = discretizeController({ kind: 'pid', ...p }, { sampleTime: T, computeDelay: 1 });
    const e = atInstants(run.time, run.traces.y, T, n).map((y) => 1 - y);
    const u = runController(ctrl, e);
    expect(Math.max(...u)).toBe(0.6); // the limit is reached
    atInstants(run.time, run.traces.u, T, n)
      .slice(1)
      .forEach((v, k) => expect(Math.abs(v - u[k])).toBeLessThan(1e-12));
  });

  it('a fractional computation delay (0.5 sample) agrees with the modified z-transform', () => {
    const T = 0.02;
    const d = loop(
      ['C', 'lead-lag', { k: 3, tLead: 0.1, tLag: 0.02, sampleTime: T, computeDelay: 0.5, method: 'tustin' }],
      '1/(s*(0.05*s+1))',
    );
    const n = 100;
    const run = simulate(compileModel(d), { until: n * T, outputStep: T / 4, engine: 'exact' });
    const ctrl = discretizeController(
      { kind: 'lead-lag', k: 3, tLead: 0.1, tLag: 0.02 },
      { sampleTime: T, computeDelay: 0.5, method: 'tustin' },
    );
    const G = dtMul(ctrl.transfer, holdEquivalent(parseTransferFunction('1/(s*(0.05*s+1))'), T, { computeDelay: 0.5 }));
    const ref = closedLoopStep(G, n);
    atInstants(run.time, run.traces.y, T, n).forEach((v, k) => expect(Math.abs(v - ref[k])).toBeLessThan(1e-8));
  });

  it('multirate: two sampled blocks at their own rates run; a slow outer sampler holds for 4 inner samples', () => {
    const d = diagramOf(
      [
        ['r', 'source', { shape: 'step', amplitude: 1, start: 0 }],
        ['e1', 'summing-junction', { signs: '+-' }],
        ['Co', 'gain', { k: 4, sampleTime: 0.004 }],
        ['e2', 'summing-junction', { signs: '+-' }],
        ['Ci', 'pid', { kp: 1.2, ti: 0.01, td: 0, sampleTime: 0.001 }],
        ['Gi', 'transfer-function', { expression: '50/(s+10)' }],
        ['Go', 'integrator', { k: 1 }],
        ['y', 'probe'],
        ['uo', 'probe'],
      ],
      ['r->e1.in1', 'e1->Co', 'Co->e2.in1', 'e2->Ci', 'Ci->Gi', 'fi:Gi->e2.in2', 'Gi->Go', 'fo:Go->e1.in2', 'Go->y', 'Co->uo'],
    );
    const run = simulate(compileModel(d), { until: 2, outputStep: 0.0005 });
    expect(run.status).toBe('ok');
    const y = run.traces.y;
    expect(Math.abs(y[y.length - 1] - 1)).toBeLessThan(1e-3); // integrating plant: no steady error
    const uo = run.traces.uo;
    let changes = 0;
    for (let i = 1; i < uo.length; i++) if (uo[i] !== uo[i - 1]) changes++;
    expect(changes).toBeLessThanOrEqual(2 / 0.004 + 1);
  });
});
