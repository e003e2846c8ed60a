import { describe, expect, it } from 'vitest';
import { demoDiagrams, serializeDiagram } from '@loopwright/graph';
import { main } from './main.ts';
import { fakeIo } from './fake-io.ts';

const axis = demoDiagrams.find((d) => d.id === 'positioning-axis')!;
const files = { 'axis.loop.json': serializeDiagram(axis.diagram) };

describe('loopwright locus --loop', () => {
  it('JSON for K/(s(s+1)(s+2)): breakaway −1 + 1/√3, crossing k = 6 at √2, asymptotes (Ogata, Example 6-1 (from memory)) [R01–R03]', async () => {
    const f = fakeIo();
    const code = await main(['locus', '--loop', '1/(s*(s+1)*(s+2))', '--json'], f.io);
    expect(f.err()).toBe('');
    expect(code).toBe(0);
    const j = JSON.parse(f.out());
    expect(j.poles).toHaveLength(3);
    expect(j.zeros).toEqual([]);
    expect(Math.abs(j.asymptotes.centroid + 1)).toBeLessThan(1e-9);
    expect(j.breakaway).toHaveLength(1);
    expect(Math.abs(j.breakaway[0].s[0] - (-1 + 1 / Math.sqrt(3)))).toBeLessThan(1e-9);
    expect(j.breakaway[0].s[1]).toBe(0);
    const c = j.crossings.find((x: { omega: number }) => x.omega > 0);
    expect(Math.abs(c.gain - 6)).toBeLessThan(1e-9);
    expect(Math.abs(c.omega - Math.SQRT2)).toBeLessThan(1e-9);
    expect(j.branches).toHaveLength(3);
    for (const br of j.branches) {
      expect(br.length).toBeGreaterThan(100);
      expect(br[0]).toHaveLength(3); // [re, im, k]
    }
    // Real-axis part (−∞, −2]: −∞ has no JSON form and is written null.
    expect(j.realAxisSegments[0][0]).toBeNull();
  });

  it('--param values and --negative', async () => {
    const f = fakeIo();
    expect(await main(['locus', '--loop', 'K0/(s*(s+a)*(s+2))', '--param', 'K0=1', '--param', 'a=1', '--negative', '--json'], f.io)).toBe(
      0,
    );
    const j = JSON.parse(f.out());
    expect(j.negative).toBe(true);
    // The other root of 3s² + 6s + 2 = 0, on the k < 0 locus (Ogata, Example 6-1 (from memory)) [R02].
    expect(Math.abs(j.breakaway[0].s[0] - (-1 - 1 / Math.sqrt(3)))).toBeLessThan(1e-9);
    expect(j.breakaway[0].gain).toBeLessThan(0);
  });

  it('human-readable output by default; departure angle of R07 (Nise, Example 8.5 (from memory))', async () => {
    const f = fakeIo();
    expect(await main(['locus', '--loop', '(s+2)/((s+3)*(s^2+2*s+2))'], f.io)).toBe(0);
    expect(f.out()).toMatch(/departure angles\s+-108\.43°.*; 108\.43° from -1 \+ 1j/);
    expect(f.out()).toMatch(/branches\s+3 /);
  });

  it('dead time goes through a reported Padé approximant', async () => {
    const f = fakeIo();
    expect(await main(['locus', '--loop', 'exp(-0.5*s)/(s*(s+1))', '--pade-order', '2', '--json'], f.io)).toBe(0);
    const j = JSON.parse(f.out());
    expect(j.delayHandling).toEqual({ mode: 'pade', order: 2, delay: 0.5 });
    expect(j.poles).toHaveLength(4);
  });

  it('bad input exits 2 naming what is wrong, with a caret under the position', async () => {
    const f = fakeIo();
    expect(await main(['locus', '--loop', '1/(s*(s+1)+'], f.io)).toBe(2);
    const lines = f.err().split('\n');
    const textLine = lines.findIndex((l) => l.includes('1/(s*(s+1)+'));
    expect(textLine).toBeGreaterThanOrEqual(0);
    const caret = lines[textLine + 1].indexOf('^');
    expect(caret).toBeGreaterThan(0);
    expect(caret - lines[textLine].indexOf('1/(')).toBeGreaterThanOrEqual(0);
    const g = fakeIo();
    expect(await main(['locus', '--loop', '(s^2+1)/(s+1)'], g.io)).toBe(2);
    expect(g.err()).toMatch(/improper/);
    const h = fakeIo();
    expect(await main(['locus'], h.io)).toBe(2);
    expect(h.err()).toMatch(/--loop/);
    const u = fakeIo();
    expect(await main(['locus', '--loop', '1/s', '--sweep', 'K'], u.io)).toBe(2);
    expect(u.err()).toMatch(/diagram FILE/);
  });

  it('--help', async () => {
    const f = fakeIo();
    expect(await main(['locus', '--help'], f.io)).toBe(0);
    expect(f.out()).toMatch(/--negative/);
    expect(f.out()).toMatch(/--sweep PARAM/);
  });
});

describe('loopwright locus FILE --sweep', () => {
  it('delegates to the diagram locus (exact mode for a gain)', async () => {
    const f = fakeIo(files);
    expect(await main(['locus', 'axis.loop.json', '--sweep', 'Kp_pos', '--json'], f.io)).toBe(0);
    const j = JSON.parse(f.out());
    expect(j.mode).toBe('exact');
    expect(j.branches.length).toBe(j.poles.length);
    const t = fakeIo(files);
    expect(await main(['locus', 'axis.loop.json', '--sweep', 'Kp_pos'], t.io)).toBe(0);
    expect(t.out()).toMatch(/as Kp_pos varies/);
  });
  it('a missing file or sweep is a usage error', async () => {
    const f = fakeIo(files);
    expect(await main(['locus', 'nope.loop.json', '--sweep', 'K'], f.io)).toBe(2);
    expect(f.err()).toMatch(/nope\.loop\.json/);
    const g = fakeIo(files);
    expect(await main(['locus', 'axis.loop.json'], g.io)).toBe(2);
    expect(g.err()).toMatch(/--sweep/);
  });
});

describe('loopwright margins', () => {
  it('JSON for 4/(s+1)³: GM 2 at √3, PM 27.14°, Ms 3 (reference table, derived) [R21, R25]', async () => {
    const f = fakeIo();
    expect(await main(['margins', '--loop', '4/(s+1)^3', '--json'], f.io)).toBe(0);
    const j = JSON.parse(f.out());
    expect(Math.abs(j.gainMargin - 2)).toBeLessThan(1e-9);
    expect(Math.abs(j.gainMarginDb - 20 * Math.log10(2))).toBeLessThan(1e-9);
    expect(Math.abs(j.phaseCrossover - Math.sqrt(3))).toBeLessThan(1e-9);
    expect(Math.abs(j.phaseMarginDeg - 27.14)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(j.gainCrossover - Math.sqrt(4 ** (2 / 3) - 1))).toBeLessThan(1e-9);
    expect(Math.abs(j.delayMargin - 0.3843)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(j.peakSensitivity - 3)).toBeLessThan(1e-6);
    expect(j.closedLoopStable).toBe(true);
    expect(j.gainCrossovers).toHaveLength(1);
    expect(j.phaseCrossovers).toHaveLength(1);
  });
  it('null where a quantity does not exist (first-order loop: infinite GM, no crossover)', async () => {
    const f = fakeIo();
    expect(await main(['margins', '--loop', '0.5/(s+1)', '--json'], f.io)).toBe(0);
    const j = JSON.parse(f.out());
    expect(j.gainMargin).toBeNull();
    expect(j.phaseMarginDeg).toBeNull();
    expect(j.delayMargin).toBeNull();
  });
  it('human output with dead time and parameters; R24 loop 0.5e^(−s)/s: GM π, DM π − 1', async () => {
    const f = fakeIo();
    expect(await main(['margins', '--loop', 'k*exp(-T*s)/s', '--param', 'k=0.5', '--param', 'T=1'], f.io)).toBe(0);
    expect(f.out()).toMatch(/gain margin\s+3\.14159 \(9\.943 dB\) at 1\.5708 rad\/s/);
    expect(f.out()).toMatch(/delay margin\s+2\.14159 s/);
    expect(f.out()).toMatch(/closed loop\s+stable \(dead time as Padé/);
  });
  it('bad input exits 2: unknown parameter named, with a caret', async () => {
    const f = fakeIo();
    expect(await main(['margins', '--loop', 'Kc/(s+1)'], f.io)).toBe(2);
    expect(f.err()).toMatch(/Kc/);
    expect(f.err()).toMatch(/\^/);
    const g = fakeIo();
    expect(await main(['margins', '--loop', '1/(s+1)', '--param', 'x'], g.io)).toBe(2);
    expect(g.err()).toMatch(/NAME=VALUE/);
    const h = fakeIo();
    expect(await main(['margins', '--help'], h.io)).toBe(0);
    expect(h.out()).toMatch(/--loop EXPR/);
  });
});
