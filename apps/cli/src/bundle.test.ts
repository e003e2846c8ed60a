// The installed command is the esbuild bundle (apps/cli/scripts/build.mjs), not these sources:
// run through bin/ (which rebuilds a stale bundle first) it must answer exactly as main() does
// in-process, with the same exit codes.
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { main } from './main.ts';

const BIN = fileURLToPath(new URL('../bin/loopwright.mjs', import.meta.url));
const DEMO = fileURLToPath(new URL('../../../packages/graph/src/demos/positioning-axis.loop.json', import.meta.url));

async function inProcess(argv: string[]) {
  let stdout = '';
  let stderr = '';
  const { readFile } = await import('node:fs/promises');
  const code = await main(argv, {
    stdout: (s) => void (stdout += s),
    stderr: (s) => void (stderr += s),
    readFile: (p) => readFile(p, 'utf8'),
    writeFile: async () => {},
  });
  return { code, stdout, stderr };
}

function bundled(argv: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...argv], { encoding: 'utf8', timeout: 120_000 });
  // A rebuild note may precede the output when the sources changed since the last build.
  const stderr = r.stderr.replace(/^loopwright: sources changed since the command was built;.*\n/, '');
  return { code: r.status, stdout: r.stdout, stderr };
}

describe('the bundled command', () => {
  const cases: [string, string[]][] = [
    ['--help', ['--help']],
    ['margins --json', ['margins', '--loop', '4/(s+1)^3', '--json']],
    ['locus --json with dead time refused', ['locus', '--loop', 'K*exp(-0.5*s)/(s+1)', '--param', 'K=1', '--json']],
    ['loops of a demo diagram', ['loops', DEMO, '--json']],
    ['a bad expression (exit 2)', ['margins', '--loop', '4/(s+1']],
    ['an unknown command (exit 2)', ['no-such-command']],
  ];
  it.each(cases)(
    '%s: same output and exit code as main() in-process',
    async (_label, argv) => {
      const want = await inProcess(argv);
      const got = bundled(argv);
      expect(got).toEqual(want);
    },
    180_000,
  );
});
