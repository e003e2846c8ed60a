// `npm run bench`: runs every tests/bench/*.bench.ts in one process, one after another.
import { readdirSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { dirname, join } from 'node:path';

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
  await mod.run();
}
