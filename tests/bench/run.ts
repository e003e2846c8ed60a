// `npm run bench`: runs every tests/bench/*.bench.ts in one process, one after another, then
// writes every figure printed to test-artifacts/bench.json (see harness.ts for the names).
import { mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { dirname, join, resolve } from 'node:path';
import { figurePrefix, recordedFigures } from './harness.ts';

const here = dirname(fileURLToPath(import.meta.url));
const only = process.argv.slice(2);
const files = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => only.length === 0 || only.some((o) => f.includes(o)))
  .sort();
console.log(`Loopwright bench — ${new Date().toISOString()} — node ${process.version}`);
console.log('Times are medians over repeated runs in this process; compare ratios, not absolute times.');
for (const f of files) {
  const mod = (await import(pathToFileURL(join(here, f)).href)) as { run?: () => Promise<void> | void };
  if (typeof mod.run !== 'function') {
    console.log(`\n(${f}: exports no run())`);
    continue;
  }
  figurePrefix(f.replace(/\.bench\.ts$/, ''));
  await mod.run();
}

const figures = recordedFigures();
const sorted = Object.fromEntries(
  Object.keys(figures)
    .sort()
    .map((k) => [k, figures[k]]),
);
const out = resolve(here, '..', '..', 'test-artifacts', 'bench.json');
mkdirSync(dirname(out), { recursive: true });
writeFileSync(out, JSON.stringify(sorted, null, 2) + '\n');
console.log(`\n${Object.keys(sorted).length} figures written to test-artifacts/bench.json`);
