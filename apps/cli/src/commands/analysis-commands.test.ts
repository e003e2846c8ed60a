import { describe, expect, it } from 'vitest';
import { main } from '../main.ts';
import { fakeIo } from '../fake-io.ts';
import { locusFromDiagram } from './locus-diagram.ts';
// Test-only builders from the graph package (not part of its public API).
import { threeLoopAxis } from '@loopwright/graph/testing';
import { r27Cascade } from '@loopwright/study/testing';

// R27 cascade as a diagram: C1 = 2, C2 = 5, G2 = 1/(s+1), G1 = 1/s (Nise, Sec. 5.2 (from memory); instance from the reference table) [R27]
const r27 = r27Cascade();
const files = { 'r27.loop.json': JSON.stringify(r27), 'axis.loop.json': JSON.stringify(threeLoopAxis()) };

describe('loopwright reduce', () => {
  it('prints R27 closed loop 10/(s² + 6s + 10) as JSON with ascending arrays and a highest-first text', async () => {
    const f = fakeIo(files);
    const code = await main(['reduce', 'r27.loop.json', '--from', 'r', '--to', 'y', '--json'], f.io);
    expect(f.err()).toBe('');
    expect(code).toBe(0);
    const j = JSON.parse(f.out());
    expect(j.numeratorAscending.length).toBe(1);
    expect(Math.abs(j.numeratorAscending[0] - 10)).toBeLessThan(1e-9);
    [10, 6, 1].forEach((c, i) => expect(Math.abs(j.denominatorAscending[i] - c)).toBeLessThan(1e-9));
    expect(j.text).toMatch(/^\(10\)\/\(s\^2 \+ 6\*s \+ 10\)$/);
    const poles = (j.poles as [number, number][]).sort((a, b) => a[1] - b[1]);
    expect(Math.abs(poles[0][0] + 3) + Math.abs(poles[0][1] + 1)).toBeLessThan(1e-4);
    expect(j.delayHandling.mode).toBe('none');
  });

  it('--set overrides a named parameter: C1 = 6 with G2 = 1/(s+1) gives 30/(s² + 6s + 30)', async () => {
    // Formula of R27 with C1 = 6: C1C2G1G2/(1 + C2G2 + C1C2G1G2) = 30/(s² + 6s + 30).
    const f = fakeIo(files);
    expect(await main(['reduce', 'r27.loop.json', '--from', 'r', '--to', 'y', '--set', 'C1=6', '--json'], f.io)).toBe(0);
    const j = JSON.parse(f.out());
    expect(Math.abs(j.denominatorAscending[0] - 30)).toBeLessThan(1e-9);
  });

  it('a wire as injection point and text output', async () => {
    const f = fakeIo(files);
    expect(await main(['reduce', 'r27.loop.json', '--from', 'wire:outer', '--to', 'y'], f.io)).toBe(0);
    expect(f.out()).toMatch(/T\(s\) from wire outer to block y/);
    expect(f.out()).toMatch(/denominator \(highest power first\): s\^2 \+ 6\*s \+ 10/);
  });

  it('bad input exits 2 naming the thing at fault', async () => {
    for (const [argv, msg] of [
      [['reduce', 'r27.loop.json', '--from', 'nope', '--to', 'y'], /--from nope/],
      [['reduce', 'missing.loop.json', '--from', 'r', '--to', 'y'], /missing\.loop\.json: no such file/],
      [['reduce', 'r27.loop.json', '--from', 'r', '--to', 'y', '--set', 'Kx=1'], /Kx/],
      [['reduce', 'r27.loop.json', '--to', 'y'], /--from/],
    ] as [string[], RegExp][]) {
      const f = fakeIo(files);
      expect(await main(argv, f.io)).toBe(2);
      expect(f.err()).toMatch(msg);
    }
  });
});

describe('loopwright loops', () => {
  it('lists every cut with margins and the separation ratios', async () => {
    const f = fakeIo(files);
    expect(await main(['loops', 'axis.loop.json', '--json'], f.io)).toBe(0);
    const j = JSON.parse(f.out());
    expect(j.cuts.map((c: { cut: string }) => c.cut)).toEqual(['current', 'speed', 'position']);
    expect(j.separations.length).toBe(2);
    // Ideal speed loop: the position loop is Kpos/s = 40/s: crossover 40 rad/s, PM 90°.
    const pos = j.outerVsIdeal.find((o: { outer: string }) => o.outer === 'position');
    expect(Math.abs(pos.ideal.gainCrossover - 40)).toBeLessThan(1e-6);
    expect(Math.abs(pos.ideal.phaseMarginDeg - 90)).toBeLessThan(1e-6);
    const t = fakeIo(files);
    expect(await main(['loops', 'axis.loop.json'], t.io)).toBe(0);
    expect(t.out()).toMatch(/current loop: cut current on wire fbCur/);
    expect(t.out()).toMatch(/separation/);
  });
});

describe('locus of a diagram parameter', () => {
  it('exact mode for a gain, with the loop-form JSON shape', () => {
    const j = locusFromDiagram(files['axis.loop.json'], 'Kpos', ['Kv=0.2']);
    expect(j.mode).toBe('exact');
    for (const key of ['poles', 'zeros', 'asymptotes', 'breakaway', 'crossings', 'departures', 'branches']) expect(j).toHaveProperty(key);
    expect(j.branches.length).toBe(j.poles.length);
    // One asymptote per excess pole, angles (2q+1)·180°/(n − m) (Ogata, Sec. 6-2 (from memory)).
    const n = j.poles.length;
    const m = j.zeros.length;
    expect(j.asymptotes.anglesDeg.length).toBe(n - m);
    j.asymptotes.anglesDeg.forEach((a: number) =>
      expect(
        Math.min(
          ...[...Array(n - m).keys()].map((q) => Math.abs(Math.abs(a) - Math.abs(((((2 * q + 1) * 180) / (n - m) + 180) % 360) - 180))),
        ),
      ).toBeLessThan(1e-6),
    );
  });

  it('an unknown parameter is refused by name', () => {
    expect(() => locusFromDiagram(files['axis.loop.json'], 'Kzz')).toThrow(/Kzz/);
  });
});
