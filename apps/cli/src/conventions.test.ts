/**
 * Command-line conventions (issue 10 item 8) and one validation for every command (issue 10
 * item 4): JSON errors, standard input, write errors, budget errors, EPIPE, unknown flags; and
 * reduce, loops, locus and simulate refusing what check refuses, with the same message.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { checkDiagram, positioningAxis, serializeDiagram, type Diagram } from '@loopwright/graph';
import { findingText } from '@loopwright/study';
import { errorReport, main } from './main.ts';
import { fakeIo as makeIo } from './fake-io.ts';
/** The shared fake io, with this file's positional options (standard input, failing writes). */
const fakeIo = (files: Record<string, string> = {}, stdin?: string, failWrites = false) =>
  makeIo(files, { ...(stdin !== undefined ? { stdin } : {}), failWrites });
// Test-only builders of the study package (not its public API).
import { unityLoop } from '@loopwright/study/testing';

/** r → e(+−) → gain K → 1/(s(s+2)) → y with unity feedback (a cut on the feedback wire), run for 5 s. */
function loop(): Diagram {
  const d = unityLoop(2);
  d.simulation = { end: 5 };
  return d;
}

describe('conventions', () => {
  it('--json errors are JSON on standard output as well as words on standard error', async () => {
    const f = fakeIo({ 'a.loop.json': serializeDiagram(loop()) });
    expect(await main(['reduce', 'a.loop.json', '--from', 'nope', '--to', 'y', '--json'], f.io)).toBe(2);
    const j = JSON.parse(f.out());
    expect(j.error.message).toMatch(/--from nope: no block or wire with this id/);
    expect(j.error.at).toBe('--from');
    expect(f.err()).toMatch(/^loopwright reduce: --from nope/);
    const g = fakeIo({});
    expect(await main(['loops', 'missing.loop.json', '--json'], g.io)).toBe(2);
    expect(JSON.parse(g.out()).error).toEqual({ message: 'cannot read missing.loop.json: no such file', at: 'missing.loop.json' });
  });

  it('"-" reads the diagram from standard input', async () => {
    const f = fakeIo({}, serializeDiagram(loop()));
    expect(await main(['loops', '-', '--json'], f.io)).toBe(0);
    expect(JSON.parse(f.out()).cuts[0].cut).toBe('c1');
    const g = fakeIo({});
    expect(await main(['check', '-'], g.io)).toBe(2);
    expect(g.err()).toMatch(/standard input is not available/);
  });

  it('a CSV that cannot be written: exit 2 naming the path, the summary still printed', async () => {
    const f = fakeIo({ 'a.loop.json': serializeDiagram(loop()) }, undefined, true);
    expect(await main(['simulate', 'a.loop.json', '--csv', '/nope/out.csv'], f.io)).toBe(2);
    expect(f.out()).toMatch(/a\.loop\.json: ok — completed at t = 5 s/);
    expect(f.out()).toMatch(/probe y: final/);
    expect(f.err()).toMatch(/cannot write the traces to \/nope\/out\.csv: EACCES/);
    const j = fakeIo({ 'a.loop.json': serializeDiagram(loop()) }, undefined, true);
    expect(await main(['simulate', 'a.loop.json', '--csv', '/nope/out.csv', '--json'], j.io)).toBe(2);
    const r = JSON.parse(j.out());
    expect(r.status).toBe('ok');
    expect(r.error.at).toBe('/nope/out.csv');
  });

  it('a budget error (an analysis past its time or size cap) exits 2 with its message; anything unexpected is internal (1)', () => {
    const budget = Object.assign(new Error('margins: more than 10000 phase crossovers below 1e6 rad/s'), { budget: true, reason: 'size' });
    expect(errorReport(budget)).toEqual({ code: 2, message: budget.message, at: null });
    expect(errorReport(new TypeError('x is undefined'))).toMatchObject({ code: 1, message: 'internal error: x is undefined' });
  });

  it('flags are parsed by node:util parseArgs: unknown flags, missing values and values given to switches are refused by name', async () => {
    const files = { 'a.loop.json': serializeDiagram(loop()) };
    for (const [argv, msg] of [
      [['loops', 'a.loop.json', '--nope'], /unknown flag --nope/],
      [['reduce', 'a.loop.json', '--from'], /flag --from needs a value/],
      [['loops', 'a.loop.json', '--json=yes'], /flag --json takes no value/],
      [['simulate', 'a.loop.json', '--until', '-1'], /--until=VALUE/],
    ] as [string[], RegExp][]) {
      const f = fakeIo(files);
      expect(await main(argv, f.io)).toBe(2);
      expect(f.err()).toMatch(msg);
    }
    const f = fakeIo(files);
    expect(await main(['simulate', 'a.loop.json', '--until=-1'], f.io)).toBe(2);
    expect(f.err()).toMatch(/--until: -1 must be above 0 s/);
  });

  it('"| head -1" ends the run quietly (no EPIPE trace), in a real process', () => {
    const dir = mkdtempSync(join(tmpdir(), 'loopwright-epipe-'));
    try {
      const file = join(dir, 'axis.loop.json');
      writeFileSync(file, serializeDiagram(positioningAxis));
      const bin = resolve(import.meta.dirname, '..', 'bin', 'loopwright.mjs');
      const r = spawnSync('bash', ['-c', `node "${bin}" simulate "${file}" --json 2>"${dir}/err" | head -1; cat "${dir}/err"`], {
        encoding: 'utf8',
        timeout: 60_000,
      });
      expect(r.stdout.split('\n')[0]).toBe('{');
      expect(r.stdout).not.toMatch(/EPIPE|Error/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('one validation for every command (what check refuses)', () => {
  const cases: [string, (d: Diagram) => void, string][] = [
    [
      'a wire into an output port',
      (d) => d.wires.push({ id: 'bad', from: { block: 'r', port: 'out' }, to: { block: 'k', port: 'out' } }),
      'wire-into-output',
    ],
    [
      'two wires into one input',
      (d) => d.wires.push({ id: 'two', from: { block: 'r', port: 'out' }, to: { block: 'k', port: 'in' } }),
      'multiple-drivers',
    ],
    ['a parameter defined twice', (d) => d.parameters.push({ name: 'K', value: 9 }), 'duplicate-parameter'],
    [
      'an ill-posed self-loop',
      (d) => {
        d.blocks[1].params.signs = '++';
        d.wires = d.wires.filter((w) => w.id !== 'fb');
        d.cuts = [];
        d.wires.push({ id: 'self', from: { block: 'k', port: 'out' }, to: { block: 'e', port: 'in2' } });
        d.parameters[0].value = 1;
      },
      'ill-posed-algebraic-loop',
    ],
  ];
  for (const [name, edit, code] of cases) {
    it(`${name}: check exits 2, and reduce, loops, locus and simulate refuse it with the same message`, async () => {
      const d = loop();
      edit(d);
      const errors = checkDiagram(d).filter((f) => f.severity === 'error');
      expect(errors.map((f) => f.code)).toContain(code);
      const message = findingText(errors[0]);
      const files = { 'bad.loop.json': JSON.stringify(d) };
      const c = fakeIo(files);
      expect(await main(['check', 'bad.loop.json'], c.io)).toBe(2);
      expect(c.out()).toContain(`error  ${message}`);
      for (const argv of [
        ['reduce', 'bad.loop.json', '--from', 'r', '--to', 'y'],
        ['loops', 'bad.loop.json'],
        ['locus', 'bad.loop.json', '--sweep', 'K'],
        ['simulate', 'bad.loop.json'],
      ]) {
        const f = fakeIo(files);
        expect(await main(argv, f.io), argv.join(' ')).toBe(2);
        expect(f.err()).toContain(`loopwright ${argv[0]}: ${message}`);
        expect(f.out()).toBe('');
      }
    });
  }
});
