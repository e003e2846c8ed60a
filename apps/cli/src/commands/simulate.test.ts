import { describe, expect, it } from 'vitest';
import { heatingCascade, positioningAxis, serializeDiagram } from '@loopwright/graph';
import { main } from '../main.ts';

function harness(files: Record<string, string>) {
  const out: string[] = [];
  const err: string[] = [];
  const written: Record<string, string> = {};
  return {
    out,
    err,
    written,
    io: {
      stdout: (s: string) => void out.push(s),
      stderr: (s: string) => void err.push(s),
      readFile: async (p: string) => {
        if (!(p in files)) throw Object.assign(new Error(`ENOENT: ${p}`), { code: 'ENOENT' });
        return files[p];
      },
      writeFile: async (p: string, text: string) => void (written[p] = text),
    },
  };
}

describe('loopwright simulate', () => {
  it('writes a CSV with a header row (time, then one column per probe) and prints figures', async () => {
    const h = harness({ 'axis.loop.json': serializeDiagram(positioningAxis) });
    expect(await main(['simulate', 'axis.loop.json', '--until', '0.2', '--csv', 'out.csv'], h.io)).toBe(0);
    const csv = h.written['out.csv'].trim().split('\n');
    const probes = positioningAxis.blocks.filter((b) => b.kind === 'probe').map((b) => b.id);
    expect(csv[0]).toBe(['time', ...probes].join(','));
    const last = csv[csv.length - 1].split(',').map(Number);
    expect(last[0]).toBe(0.2);
    expect(last.length).toBe(probes.length + 1);
    expect(last.every(Number.isFinite)).toBe(true);
    expect(h.out.join('')).toMatch(/ok — completed at t = 0.2 s/);
    expect(h.out.join('')).toMatch(/actuator /);
  });

  it('--json gives traces and metrics; --set changes the run', async () => {
    const h = harness({ 'heat.loop.json': serializeDiagram(heatingCascade) });
    expect(await main(['simulate', 'heat.loop.json', '--until', '3600', '--json'], h.io)).toBe(0);
    const a = JSON.parse(h.out.join(''));
    expect(a.status).toBe('ok');
    expect(a.time.length).toBeGreaterThan(100);
    expect(Object.keys(a.traces).length).toBeGreaterThan(0);
    const probe = Object.keys(a.traces)[0];
    expect(a.metrics[probe]).toHaveProperty('settlingTime');
    const h2 = harness({ 'heat.loop.json': serializeDiagram(heatingCascade) });
    const name = heatingCascade.parameters[0].name;
    expect(
      await main(
        ['simulate', 'heat.loop.json', '--until', '3600', '--json', '--set', `${name}=${heatingCascade.parameters[0].value * 2}`],
        h2.io,
      ),
    ).toBe(0);
    const b = JSON.parse(h2.out.join(''));
    expect(b.traces[probe]).not.toEqual(a.traces[probe]);
  });

  it('bad input exits 2 naming the problem; an early stop exits 1 with its message', async () => {
    const h = harness({ 'axis.loop.json': serializeDiagram(positioningAxis) });
    expect(await main(['simulate', 'axis.loop.json', '--set', 'Nope=1'], h.io)).toBe(2);
    expect(h.err.join('')).toMatch(/no named parameter "Nope"/);
    expect(await main(['simulate', 'missing.loop.json'], h.io)).toBe(2);
    expect(await main(['simulate', 'axis.loop.json', '--until', 'soon'], h.io)).toBe(2);
    const h3 = harness({ 'axis.loop.json': serializeDiagram(positioningAxis) });
    expect(await main(['simulate', 'axis.loop.json', '--max-steps', '20'], h3.io)).toBe(1);
    expect(h3.err.join('')).toMatch(/step budget of 20 steps ran out at t = /);
  });
});
