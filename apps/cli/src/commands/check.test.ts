import { describe, expect, it } from 'vitest';
import { positioningAxis, serializeDiagram } from '@loopwright/graph';
import { main } from '../main.ts';

function harness(files: Record<string, string>) {
  const out: string[] = [];
  const err: string[] = [];
  return {
    out,
    err,
    io: {
      stdout: (s: string) => void out.push(s),
      stderr: (s: string) => void err.push(s),
      readFile: async (p: string) => {
        if (!(p in files)) throw Object.assign(new Error(`ENOENT: ${p}`), { code: 'ENOENT' });
        return files[p];
      },
      writeFile: async () => {},
    },
  };
}

const demo = serializeDiagram(positioningAxis);
const broken = (() => {
  const d = structuredClone(positioningAxis);
  d.blocks.find((b) => b.id === 'speed-controller')!.params.kp = '2*Kq';
  d.wires.push({ id: 'w-extra', from: { block: 'winding', port: 'out' }, to: { block: 'current', port: 'in' } });
  return serializeDiagram(d);
})();

describe('loopwright check', () => {
  it('a sound demo: no errors, exit 0', async () => {
    const h = harness({ 'axis.loop.json': demo });
    expect(await main(['check', 'axis.loop.json'], h.io)).toBe(0);
    const text = h.out.join('');
    expect(text).not.toMatch(/^error/m);
    expect(text).toMatch(/axis\.loop\.json: (no findings|0 errors)/);
  });
  it('errors: one line each naming the block or wire, exit 2', async () => {
    const h = harness({ 'b.loop.json': broken });
    expect(await main(['check', 'b.loop.json'], h.io)).toBe(2);
    const lines = h.out.join('').split('\n');
    expect(lines).toContain('error  block speed-controller: field kp: "2*Kq" uses "Kq", not a named parameter');
    expect(lines.some((l) => /^error {2}blocks current: |^error {2}block current: input "in" is driven by 2 wires/.test(l))).toBe(true);
    expect(lines.at(-2)).toMatch(/^b\.loop\.json: 2 errors, /);
  });
  it('--json lists the findings with counts', async () => {
    const h = harness({ 'b.loop.json': broken });
    expect(await main(['check', 'b.loop.json', '--json'], h.io)).toBe(2);
    const r = JSON.parse(h.out.join(''));
    expect(r.loaded).toBe(true);
    expect(r.counts.error).toBe(2);
    expect(r.findings.map((f: { code: string }) => f.code)).toContain('unknown-parameter');
  });
  it('--set overrides a named parameter; an unknown name is a usage error', async () => {
    const h = harness({ 'axis.loop.json': demo });
    // 50 × the design position gain destabilises the axis (see the demo's hand-assembled check);
    // instability is a warning (the diagram is well-formed), so the exit code stays 0
    expect(await main(['check', 'axis.loop.json', '--set', 'Kp_pos=2000', '--json'], h.io)).toBe(0);
    const r = JSON.parse(h.out.join(''));
    expect(r.overrides).toEqual({ Kp_pos: 2000 });
    expect(r.findings.map((f: { code: string }) => f.code)).toContain('closed-loop-unstable');
    const h1 = harness({ 'axis.loop.json': demo });
    await main(['check', 'axis.loop.json', '--json'], h1.io);
    expect(JSON.parse(h1.out.join('')).findings.map((f: { code: string }) => f.code)).not.toContain('closed-loop-unstable');
    const h2 = harness({ 'axis.loop.json': demo });
    expect(await main(['check', 'axis.loop.json', '--set', 'Kq=1'], h2.io)).toBe(2);
    expect(h2.err.join('')).toContain('--set Kq: the diagram has no named parameter "Kq"');
  });
  it('a file that does not load: every problem, exit 2', async () => {
    const d = JSON.parse(demo);
    d.blocks[0].params.amplitude = true;
    d.version = 1;
    const h = harness({ 'x.loop.json': JSON.stringify(d) });
    expect(await main(['check', 'x.loop.json'], h.io)).toBe(2);
    expect(h.out.join('')).toContain(
      'error  blocks[0] (id "position-setpoint").params.amplitude: expected a number or an expression, got true',
    );
  });
  it('a missing file or no file is a usage error (exit 2)', async () => {
    const h = harness({});
    expect(await main(['check', 'nope.loop.json'], h.io)).toBe(2);
    expect(h.err.join('')).toContain('cannot read nope.loop.json: no such file');
    expect(await main(['check'], h.io)).toBe(2);
  });
});
