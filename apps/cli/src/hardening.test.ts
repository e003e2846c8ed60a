/**
 * Every command ends (issue 10 items 1, 2 and 7, through the command line): the analyses that
 * once ran for minutes or crashed answer fast with small output, and every command runs under a
 * time limit (--time-limit, default 20 s) that ends it with a message naming what ran out (exit 2).
 * A probe cannot hide an internally unstable design (item 5). Closed forms are derived beside
 * each check.
 */
import { describe, expect, it } from 'vitest';
import { positioningAxis, serializeDiagram } from '@loopwright/graph';
import { budgetNow } from '@loopwright/lti';
import { DEFAULT_TIME_LIMIT_S, main, takeTimeLimit } from './main.ts';
import { fakeIo } from './fake-io.ts';
// Test-only builders of the study package (not its public API).
import { build } from '@loopwright/study/testing';

/** Wide limits: the test machines are shared (`npm run bench` records the real times). */
const FAST_MS = 5000;

async function timed(argv: string[], files: Record<string, string> = {}) {
  const f = fakeIo(files);
  const t0 = budgetNow();
  const code = await main(argv, f.io);
  return { code, ms: budgetNow() - t0, out: f.out(), err: f.err() };
}

describe('commands that once did not end', () => {
  for (const [loop, first] of [
    // 2·e^(−jω): phase −ω crosses −180° at ω = π (Nyquist, derived here).
    ['2*exp(-s)', Math.PI],
    ['exp(-s)', Math.PI],
    // (s+1)/(s+2)·e^(−s): the rational phase is ≥ 0, so the first crossover lies above π: checked as > π and < 2π.
    ['(s+1)/(s+2)*exp(-s)', null],
  ] as [string, number | null][]) {
    it(`margins --loop "${loop}" answers fast with small output`, async () => {
      const r = await timed(['margins', '--loop', loop, '--json']);
      expect(r.code).toBe(0);
      expect(r.ms).toBeLessThan(FAST_MS);
      expect(r.out.length).toBeLessThan(100_000);
      const j = JSON.parse(r.out);
      const w0 = j.phaseCrossoverDetails[0].omega;
      if (first !== null) expect(w0).toBeCloseTo(first, 6);
      else expect(w0 > Math.PI && w0 < 2 * Math.PI).toBe(true);
      expect(j.closedLoopStable).toBe(false);
    });
  }

  it('margins --loop "exp(-1e5*s)/(s+1)" answers fast and small; "exp(-1e308*s)/(s+1)" answers instead of crashing', async () => {
    const a = await timed(['margins', '--loop', 'exp(-1e5*s)/(s+1)', '--json']);
    expect(a.code).toBe(0);
    expect(a.ms).toBeLessThan(FAST_MS);
    expect(a.out.length).toBeLessThan(100_000);
    // |L| < 1 for every ω > 0 and L is open-loop stable: stable for any dead time (small gain).
    expect(JSON.parse(a.out).closedLoopStable).toBe(true);
    const b = await timed(['margins', '--loop', 'exp(-1e308*s)/(s+1)']);
    expect(b.code).toBe(0);
    expect(b.out).toMatch(/closed loop {8}stable/);
  });

  it('locus --loop "1/(s+1)^20" ends fast; the crossing is at ω = tan(π/20) with k = sec(π/20)^20 (angle condition, derived here)', async () => {
    const r = await timed(['locus', '--loop', '1/(s+1)^20', '--json']);
    expect(r.code).toBe(0);
    expect(r.ms).toBeLessThan(3 * FAST_MS);
    const j = JSON.parse(r.out);
    const c = j.crossings.find((x: { omega: number }) => x.omega > 0);
    expect(c.omega).toBeCloseTo(Math.tan(Math.PI / 20), 6);
    expect(c.gain / Math.cos(Math.PI / 20) ** -20).toBeCloseTo(1, 6);
  });

  it('loops on the positioning axis with T_enc = 59 s ends (exit 0) within the default limit', async () => {
    const r = await timed(['loops', 'axis.loop.json', '--set', 'T_enc=59', '--json'], {
      'axis.loop.json': serializeDiagram(positioningAxis),
    });
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(r.ms).toBeLessThan(DEFAULT_TIME_LIMIT_S * 1000);
    expect(r.out.length).toBeLessThan(2_000_000);
  });
});

describe('--time-limit', () => {
  it('an analysis past the limit ends with exit 2 and a message naming the analysis and the limit (words and --json)', async () => {
    const r = await timed(['margins', '--loop', '(s+1)/(s+2)*exp(-s)', '--time-limit', '0.000001']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(
      /^loopwright margins: margins: stopped at its time budget .*the time limit is 0\.000001 s \(--time-limit SECONDS to change it\)/,
    );
    const j = await timed(['loops', 'axis.loop.json', '--json', '--time-limit=0.000001', '--set', 'T_enc=0.0123'], {
      'axis.loop.json': serializeDiagram(positioningAxis),
    });
    expect(j.code).toBe(2);
    expect(JSON.parse(j.out).error.message).toMatch(/stopped at its time budget/);
  });

  it('is accepted by every command and refused when it is not a positive number of seconds', async () => {
    expect(takeTimeLimit(['a', '--time-limit', '3', 'b'])).toEqual({ rest: ['a', 'b'], seconds: 3 });
    expect(takeTimeLimit(['--time-limit=0.5'])).toEqual({ rest: [], seconds: 0.5 });
    expect(takeTimeLimit([]).seconds).toBe(DEFAULT_TIME_LIMIT_S);
    for (const bad of [['--time-limit', 'abc'], ['--time-limit=0'], ['--time-limit=-2'], ['--time-limit']]) {
      const r = await timed(['margins', '--loop', '1/(s+1)', ...bad]);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(/--time-limit/);
    }
    const ok = await timed(['margins', '--loop', '1/(s+1)', '--time-limit', '30']);
    expect(ok.code).toBe(0);
    const help = await timed(['loops', '--help']);
    expect(help.out).toMatch(/--time-limit SECONDS/);
  });
});

describe('a probe cannot hide an internally unstable design (issue 10 item 5)', () => {
  // A controller zero at s = 1 cancels the plant pole of 1/(s − 1): the loop r → y looks stable,
  // the diagram is not (Skogestad & Postlethwaite, Multivariable Feedback Control, Sec. 4.7 (from memory)).
  const cancelling = (probe: boolean) =>
    build(
      [
        ['r', 'source', { shape: 'step', amplitude: 1 }],
        ['e', 'summing-junction', { signs: '+-' }],
        ['C', 'transfer-function', { expression: '(s-1)/(s+1)' }],
        ['P', 'transfer-function', { expression: '1/(s-1)' }],
        ['y', 'probe'],
        ...(probe ? [['u', 'probe'] as [string, 'probe']] : []),
      ],
      ['r->e.in1', 'e->C', 'C->P', 'fb:P->e.in2', 'P->y', ...(probe ? ['C->u'] : [])],
    );
  for (const probe of [false, true]) {
    it(`reduce and loops refuse it naming both blocks, ${probe ? 'with' : 'without'} a probe on the controller output`, async () => {
      const files = { 'c.loop.json': serializeDiagram(cancelling(probe)) };
      for (const argv of [
        ['reduce', 'c.loop.json', '--from', 'r', '--to', 'y'],
        ['loops', 'c.loop.json'],
        ['check', 'c.loop.json'],
      ]) {
        const r = await timed(argv, files);
        expect(r.code).toBe(2);
        expect(r.err + r.out).toMatch(/pole 1 of block P/);
        expect(r.err + r.out).toMatch(/\bC\b/);
      }
    });
  }
});
