// Command-line start-up: wall time of `loopwright --help` and of a small analysis
// (`margins --loop "4/(s+1)^3"`) against a bare `node -e 0`, all spawned in the same run,
// interleaved, so that the machine's load weighs on each alike. Target: at most 6× node.
import { spawnSync } from 'node:child_process';
import { statSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { type BenchResult, ratio, record, report, section } from './harness.ts';

const BIN = fileURLToPath(new URL('../../apps/cli/bin/loopwright.mjs', import.meta.url));
const BUNDLE = fileURLToPath(new URL('../../apps/cli/dist/loopwright.mjs', import.meta.url));
const RUNS = 15;

// The children get a plain Node: no loader hooks (tsx) or options inherited from this process.
const env = Object.fromEntries(Object.entries(process.env).filter(([k]) => k !== 'NODE_OPTIONS'));

function wallMs(args: string[]): number {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, args, { env, stdio: ['ignore', 'pipe', 'pipe'] });
  const ms = performance.now() - t0;
  if (r.status !== 0) throw new Error(`node ${args.join(' ')} failed (exit ${r.status}): ${r.stderr}`);
  return ms;
}

function summary(name: string, times: number[]): BenchResult {
  const s = [...times].sort((a, b) => a - b);
  const q = (f: number) => s[Math.min(s.length - 1, Math.floor(f * s.length))];
  return { name, runs: s.length, median: q(0.5), p95: q(0.95), min: s[0] };
}

export function run(): void {
  section('command line: start-up against a bare node -e 0 (same run, interleaved)');
  // Once untimed: bin/ rebuilds the bundle here if a source changed since the last build.
  wallMs([BIN, '--help']);
  record('bundle.size', statSync(BUNDLE).size / 1024, 'kB');
  console.log(`  bundle apps/cli/dist/loopwright.mjs: ${(statSync(BUNDLE).size / 1024).toFixed(0)} kB`);
  const cases = {
    node: ['-e', '0'],
    help: [BIN, '--help'],
    margins: [BIN, 'margins', '--loop', '4/(s+1)^3'],
  };
  const times: Record<keyof typeof cases, number[]> = { node: [], help: [], margins: [] };
  for (const args of Object.values(cases)) wallMs(args); // warm the file cache
  for (let i = 0; i < RUNS; i++) for (const [k, args] of Object.entries(cases)) times[k as keyof typeof cases].push(wallMs(args));
  const node = summary('node -e 0', times.node);
  const help = summary('loopwright --help', times.help);
  const margins = summary('loopwright margins --loop "4/(s+1)^3"', times.margins);
  report(node, undefined, 'startup.node');
  report(help, undefined, 'startup.help');
  report(margins, undefined, 'startup.margins');
  const h = ratio('loopwright --help / node -e 0', help, node, { atMost: 6 }, 'startup.help');
  const m = ratio('loopwright margins / node -e 0', margins, node, { atMost: 6 }, 'startup.margins');
  const worst = record('startup.ratio', Math.max(h, m), 'ratio');
  console.log(
    `  ratio ${'start-up, the slower of the two / node -e 0'.padEnd(52)} ${worst.toFixed(2)}×  (target ≤ 6: ${worst <= 6 ? 'met' : 'MISSED'})`,
  );
}
