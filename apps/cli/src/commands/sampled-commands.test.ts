// The sampled-loop forms of `margins` and `locus` and the `export` command, checked against the
// reference table (rows R57, R59, R60) and, for the exported C, against the test vector it ships
// with: the C is compiled with the system `cc` (skipped with a plain message where there is none).
import { describe, expect, it } from 'vitest';
import { main } from '../main.ts';
import { compileRunAndCheck, hasCc } from '../c-check.ts';
import { fakeIo } from '../fake-io.ts';
import { diagramOf } from '@loopwright/graph/testing';
import { discretizeController, runController } from '@loopwright/sampled';

async function json(argv: string[], files: Record<string, string> = {}) {
  const f = fakeIo(files);
  const code = await main(argv, f.io);
  expect(f.err()).toBe('');
  expect(code).toBe(0);
  return JSON.parse(f.out());
}

describe('loopwright margins --sample-time', () => {
  it('R59: 1/(s(s+1)) behind a ZOH, T = 1: gain margin = Kcrit = (e − 1)/(e − 2) = 2.3922, poles inside the unit circle', async () => {
    // Jury test: Jury (1964); loop as in Ogata, Discrete-Time Control Systems (from memory) [R59]
    const j = await json(['margins', '--loop', '1/(s*(s+1))', '--sample-time', '1', '--json']);
    expect(j.sampleTime).toBe(1);
    expect(j.computeDelay).toBe(0);
    expect(j.gainMargin).toBeCloseTo((Math.E - 1) / (Math.E - 2), 4);
    expect(Math.abs(j.gainMargin - 2.3922)).toBeLessThan(1e-4);
    // the crossing at Kcrit lies at angle 1.3244 rad = ωT [R59]
    expect(Math.abs(j.phaseCrossover - 1.3244)).toBeLessThan(1e-4);
    expect(j.closedLoopStable).toBe(true);
    expect(j.closedLoopPolesPlane).toBe('z');
    // K = 1: poles 0.5 ± 0.6182j, |z| = 0.7951 [R59]
    for (const [re, im] of j.closedLoopPoles) {
      expect(Math.abs(re - 0.5)).toBeLessThan(1e-4);
      expect(Math.abs(Math.abs(im) - 0.6182)).toBeLessThan(1e-4);
    }
    // today's margins fields are all there
    for (const k of [
      'phaseMarginDeg',
      'gainCrossover',
      'delayMargin',
      'peakSensitivity',
      'peakComplementary',
      'bandwidth',
      'gainCrossoverDetails',
      'phaseCrossoverDetails',
      'padeOrder',
    ])
      expect(j).toHaveProperty(k);
    expect(j.continuousEstimate.label).toMatch(/estimate/);
  });

  it('R60: as T → 0 the sampled gain margin of K/(s(s+1)(s+2)) at K = 1 tends to the continuous 6 at ω = √2', async () => {
    // derived values of the reference table; continuous limit R03 (Routh: Kcrit = 6, ω = √2) [R60]
    const rows: [number, number, number, number][] = [
      [1, 2.6255, 0.8748, 1e-4],
      [0.1, 5.2315, 1.3186, 1e-4],
      [0.01, 5.9115, 1.4037, 1e-4],
      [0.001, 5.991, NaN, 1e-3],
    ];
    let last = 0;
    for (const [T, k, w, tol] of rows) {
      const j = await json(['margins', '--loop', '1/(s*(s+1)*(s+2))', '--sample-time', String(T), '--json']);
      expect(Math.abs(j.gainMargin - k)).toBeLessThan(tol);
      if (!Number.isNaN(w)) expect(Math.abs(j.phaseCrossover - w)).toBeLessThan(1e-4);
      expect(j.gainMargin).toBeGreaterThan(last); // monotone towards the limit
      last = j.gainMargin;
      // and the phase margin approaches the continuous one
      expect(Math.abs(j.phaseMarginDeg - j.continuous.phaseMarginDeg)).toBeLessThan(Math.max(0.05, 60 * T));
    }
    expect(Math.abs(last - 6)).toBeLessThan(0.01);
  });

  it('warns when the sample time is slow for the crossover and refuses an unknown hold', async () => {
    const j = await json(['margins', '--loop', '10/(s*(s+1))', '--sample-time', '0.2', '--json']);
    // ωc ≈ 3.08 rad/s, ωc·T ≈ 0.62 > 0.5 (Åström & Wittenmark guideline, from memory)
    expect(j.notes.map((n: { code: string }) => n.code)).toEqual(['slow-sampling']);
    const f = fakeIo({});
    expect(await main(['margins', '--loop', '1/(s+1)', '--sample-time', '0.1', '--hold', 'foh'], f.io)).toBe(2);
    expect(f.err()).toMatch(/hold: "foh" is not supported/);
    const g = fakeIo({});
    expect(await main(['margins', '--loop', '1/(s+1)', '--compute-delay', '1'], g.io)).toBe(2);
    expect(g.err()).toMatch(/--compute-delay need --sample-time/);
  });

  it('a computation delay of one sample equals a z⁻¹ in the loop (whole-sample delay, exact)', async () => {
    // z⁻¹ = e^(−jωT): it lowers the phase by ωT at every frequency and leaves |G| alone
    const a = await json(['margins', '--loop', '1/(s*(s+1))', '--sample-time', '0.1', '--json']);
    const b = await json(['margins', '--loop', '1/(s*(s+1))', '--sample-time', '0.1', '--compute-delay', '1', '--json']);
    expect(Math.abs(b.gainCrossover - a.gainCrossover)).toBeLessThan(1e-6);
    expect(Math.abs(a.phaseMarginDeg - b.phaseMarginDeg - (a.gainCrossover * 0.1 * 180) / Math.PI)).toBeLessThan(1e-4);
  });
});

describe('loopwright locus --sample-time', () => {
  it('R59: the unit-circle crossing of K/(s(s+1)), T = 1, is at K = 2.3922 and ωT = 1.3244 rad', async () => {
    const j = await json(['locus', '--loop', '1/(s*(s+1))', '--sample-time', '1', '--json']);
    expect(j.plane).toBe('z');
    const first = j.crossings.reduce((m: { gain: number }, c: { gain: number }) => (c.gain < m.gain ? c : m));
    expect(Math.abs(first.gain - 2.3922)).toBeLessThan(1e-4);
    expect(Math.abs(first.omegaT - 1.3244)).toBeLessThan(1e-4);
    expect(Math.abs(first.omega - 1.3244)).toBeLessThan(1e-4);
    expect(Math.abs(j.criticalGain - 2.3922)).toBeLessThan(1e-4);
    // the other Jury limit, K < 26.397, is where a branch leaves through z = −1 [R59]
    expect(
      j.crossings.some((c: { gain: number; omegaT: number }) => Math.abs(c.gain - 26.397) < 1e-3 && Math.abs(c.omegaT - Math.PI) < 1e-9),
    ).toBe(true);
    // open-loop poles of G(z): 1 and e^(−1) [R54 (c)]
    const poles = (j.poles as number[][]).map((p) => p[0]).sort((x, y) => x - y);
    expect(Math.abs(poles[0] - Math.exp(-1))).toBeLessThan(1e-9);
    expect(Math.abs(poles[1] - 1)).toBeLessThan(1e-9);
  });

  it('prints a summary in words', async () => {
    const f = fakeIo({});
    expect(await main(['locus', '--loop', '1/(s*(s+1))', '--sample-time', '1'], f.io)).toBe(0);
    expect(f.out()).toMatch(/unit-circle crossings k = 2\.39/);
    expect(f.out()).not.toMatch(/jω-axis/);
  });
});

// A speed loop with a sampled PI: the R57 PID instance (Kp = 2, Ti = 1.5, Td = 0.4, N = 10, T = 0.05).
const axis = diagramOf(
  [
    ['r', 'source'],
    ['e', 'summing-junction', { signs: '+-' }],
    ['pid', 'pid', { kp: 2, ti: 1.5, td: 0.4, n: 10, umin: -5, umax: 5, sampleTime: 0.05, computeDelay: 1 }],
    ['plant', 'first-order-lag', { k: 3, tau: 0.5 }],
    ['y', 'probe'],
  ],
  ['r->e.in1', 'e->pid', 'pid->plant', 'fb:plant->e.in2', 'plant->y'],
);
const files = { 'axis.loop.json': JSON.stringify(axis) };

describe('loopwright export', () => {
  it('coefficients of the R57 discrete PID from a diagram block', async () => {
    // backward-difference PID with filtered derivative: Åström & Hägglund (2006), ch. 13 (from memory) [R57]
    const j = await json(['export', 'axis.loop.json', '--block', 'pid', '--lang', 'coefficients', '--json'], files);
    expect(j.name).toBe('pid');
    expect(j.files.map((f: { path: string }) => f.path)).toEqual(['pid.txt', 'pid.vector.json']);
    expect(j.testVector.sampleTime).toBe(0.05);
    expect(j.testVector.computeDelay).toBe(1);
    expect(j.testVector.input).toHaveLength(400);
    const text: string = j.files[0].text;
    for (const v of ['0.0666666', '0.444444', '8.88888']) expect(text).toContain(v);
    // the vector comes from a simulation of the block alone; the reference executor on its
    // input gives the same outputs (two implementations: simulator instants and executor)
    const ctrl = discretizeController(
      { kind: 'pid', kp: 2, ti: 1.5, td: 0.4, n: 10, umin: -5, umax: 5 },
      { sampleTime: 0.05, computeDelay: 1 },
    );
    const u = runController(ctrl, j.testVector.input);
    u.forEach((v, k) => expect(Math.abs(v - j.testVector.output[k])).toBeLessThan(1e-12));
    // the input: a step A at k = 0, −0.6·A from k = 80 (a fifth of 400 samples)
    expect(j.testVector.input[79]).toBeCloseTo(-j.testVector.input[80] / 0.6, 12);
    // the vector reaches the limits (±5) and stays within them
    expect(Math.max(...j.testVector.output)).toBeCloseTo(5, 12);
    expect(Math.min(...j.testVector.output)).toBeCloseTo(-5, 12);
  });

  it('refuses a continuous block and an unknown block, naming them', async () => {
    const f = fakeIo(files);
    expect(await main(['export', 'axis.loop.json', '--block', 'plant', '--lang', 'c'], f.io)).toBe(2);
    expect(f.err()).toMatch(/block plant: a first-order-lag block without a sample time has no sampled form/);
    const g = fakeIo(files);
    expect(await main(['export', 'axis.loop.json', '--block', 'nope', '--lang', 'c'], g.io)).toBe(2);
    expect(g.err()).toMatch(/block nope: no block with this id/);
    const h = fakeIo(files);
    expect(await main(['export', 'axis.loop.json', '--block', 'pid', '--lang', 'py'], h.io)).toBe(2);
  });

  it('writes Structured Text with a function block', async () => {
    const f = fakeIo(files);
    expect(await main(['export', 'axis.loop.json', '--block', 'pid', '--lang', 'st', '--out', 'gen/'], f.io)).toBe(0);
    expect(Object.keys(f.written).sort()).toEqual(['gen/pid.st', 'gen/pid.vector.json']);
    expect(f.written['gen/pid.st']).toMatch(/FUNCTION_BLOCK/);
  });

  if (!hasCc) console.log('loopwright export: no C compiler (cc) found, so the exported C is not compiled here');
  it.skipIf(!hasCc)('the exported C compiles with cc and reproduces its test vector to 1e-9', async () => {
    const f = fakeIo(files);
    expect(await main(['export', 'axis.loop.json', '--block', 'pid', '--lang', 'c', '--out', 'gen'], f.io)).toBe(0);
    expect(Object.keys(f.written).sort()).toEqual(['gen/pid.c', 'gen/pid.h', 'gen/pid.vector.json', 'gen/pid_check.c']);
    const v = JSON.parse(f.written['gen/pid.vector.json']);
    const asWritten = Object.fromEntries(Object.entries(f.written).map(([p, t]) => [p.slice(4), t]));
    compileRunAndCheck(asWritten, ['pid_check.c', 'pid.c'], v.output);
  });
});
