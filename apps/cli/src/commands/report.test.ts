/**
 * `loopwright report FILE --out report.html`: the study's design report written by the command
 * line (the same bytes as the engine gives the editor's button for the same inputs), its flags
 * and its failures; and the Padé marks and the reading to act on in `loops` and `reduce`.
 */
import { describe, expect, it } from 'vitest';
import { positioningAxis, serializeDiagram } from '@loopwright/graph';
import { runStudy } from '@loopwright/study';
import { main } from '../main.ts';
import { fakeIo as makeIo } from '../fake-io.ts';

const fakeIo = (files: Record<string, string>, unwritable: string[] = []) => makeIo(files, { failWrites: unwritable });

const files = { 'axis.loop.json': serializeDiagram(positioningAxis) };

describe('loopwright report', () => {
  it("writes the study's report: the same bytes as the engine gives for the same diagram and date", async () => {
    const f = fakeIo(files);
    expect(await main(['report', 'axis.loop.json', '--out', 'r.html', '--date', '2026-01-01'], f.io)).toBe(0);
    const html = f.written['r.html'];
    expect(html).toBe(runStudy(positioningAxis, { kind: 'report', sweep: null, generatedAt: '2026-01-01' }).html);
    expect(html).toMatch(/◀ act on this/);
    expect(f.out()).toMatch(/report of "Belt-driven positioning axis" written to r\.html/);
    expect(f.err()).toBe('');
  });

  it('--sweep, --set and --json; "-" writes the HTML to standard output', async () => {
    const f = fakeIo(files);
    expect(await main(['report', 'axis.loop.json', '--out', 'r.html', '--sweep', 'Kp_spd', '--set', 'Kp_pos=30', '--json'], f.io)).toBe(0);
    const j = JSON.parse(f.out());
    expect(j).toMatchObject({ out: 'r.html', title: 'Belt-driven positioning axis', problems: [] });
    expect(j.bytes).toBe(f.written['r.html'].length);
    expect(f.written['r.html']).toMatch(/Swept: <b>Kp_spd/);
    const g = fakeIo(files);
    expect(await main(['report', 'axis.loop.json', '--out', '-'], g.io)).toBe(0);
    expect(g.out().startsWith('<!doctype html>')).toBe(true);
  });

  it('refuses what it cannot do, naming the flag or path (exit 2)', async () => {
    const f = fakeIo(files);
    expect(await main(['report', 'axis.loop.json'], f.io)).toBe(2);
    expect(f.err()).toMatch(/--out PATH is needed/);
    const g = fakeIo(files, ['/ro/r.html']);
    expect(await main(['report', 'axis.loop.json', '--out', '/ro/r.html'], g.io)).toBe(2);
    expect(g.err()).toMatch(/cannot write the report to \/ro\/r\.html: EACCES/);
    const h = fakeIo(files);
    expect(await main(['report', 'axis.loop.json', '--out', 'x.html', '--sweep', 'block:nope.k'], h.io)).toBe(2);
    expect(h.err()).toMatch(/nope/);
  });
});

describe('Padé marks and the reading to act on in the other commands', () => {
  it("loops marks each closed-loop pole and says which reading of each loop to act on, by the loop's name", async () => {
    const f = fakeIo(files);
    expect(await main(['loops', 'axis.loop.json'], f.io)).toBe(0);
    const out = f.out();
    expect(out).toMatch(/\[Padé artefact\]/);
    expect(out).toMatch(/\[via Padé\]/);
    expect(out).toMatch(/^speed loop: cut cut-speed on wire/m);
    expect(out).toMatch(/tuned inner-first \(opened position loop\): .*<- act on this/);
    expect(out).toMatch(/With position loop closed, L here has 2 open-loop right-half-plane poles/);
    const j = fakeIo(files);
    await main(['loops', 'axis.loop.json', '--json'], j.io);
    const json = JSON.parse(j.out());
    expect(json.closedLoopPoleOrigin).toHaveLength(json.closedLoopPoles.length);
    expect(json.cuts.every((c: { advice: { actOn: string } }) => ['inner-first', 'all-closed'].includes(c.advice.actOn))).toBe(true);
  });

  it('reduce marks the poles of a closed-loop form with a dead time inside a loop', async () => {
    const f = fakeIo(files);
    expect(await main(['reduce', 'axis.loop.json', '--from', 'position-setpoint', '--to', 'position'], f.io)).toBe(0);
    expect(f.out()).toMatch(/poles: .*\[Padé artefact\]/);
    expect(f.out()).toMatch(/\[via Padé\]: approximates a true root/);
  });

  it('margins marks closed-loop poles of a loop with a dead time', async () => {
    const f = fakeIo({});
    expect(await main(['margins', '--loop', '0.5*exp(-s)/s'], f.io)).toBe(0);
    expect(f.out()).toMatch(/closed-loop poles .*\[via Padé\]/);
    expect(f.out()).toMatch(/\[Padé artefact\]/);
  });
});
