#!/usr/bin/env node
// `loopwright`: runs the prebuilt bundle ../dist/loopwright.mjs (apps/cli/scripts/build.mjs;
// built by `npm ci` / `npm install`, before `npm pack`, and at the start of `npm test`).
// In a source checkout (../src exists; an installed package has only bin/ and dist/) it first
// checks that no source the bundle was built from is newer than the bundle, and rebuilds it
// if one is, so a stale bundle never answers for changed sources.
import { existsSync, readFileSync, statSync } from 'node:fs';

const bundle = new URL('../dist/loopwright.mjs', import.meta.url);

function isStale() {
  const inputs = new URL('../dist/build-inputs.json', import.meta.url);
  if (!existsSync(bundle) || !existsSync(inputs)) return true;
  const built = statSync(bundle).mtimeMs;
  const { files } = JSON.parse(readFileSync(inputs, 'utf8'));
  return files.some((f) => {
    const st = statSync(new URL(f, inputs), { throwIfNoEntry: false });
    return !st || st.mtimeMs > built;
  });
}

if (existsSync(new URL('../src/', import.meta.url)) && isStale()) {
  process.stderr.write('loopwright: sources changed since the command was built; rebuilding apps/cli/dist (npm run build:cli)\n');
  const { buildCli } = await import('../scripts/build.mjs');
  await buildCli();
}
await import(bundle.href);
