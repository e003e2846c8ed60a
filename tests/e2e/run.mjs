#!/usr/bin/env node
// Browser tests: playwright-core driving Debian chromium (never a downloaded browser).
// Without /usr/bin/chromium they are skipped with a plain message, except under CI, where a
// missing browser is a failure.
import { existsSync, readdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';

const CHROMIUM = process.env.LOOPWRIGHT_CHROMIUM ?? '/usr/bin/chromium';
if (!existsSync(CHROMIUM)) {
  const msg = `browser tests: no browser at ${CHROMIUM}; install it with: sudo apt-get install -y chromium`;
  if (process.env.CI === 'true') {
    console.error(`${msg}\nCI=true: a missing browser is a failure, not a skip.`);
    process.exit(1);
  }
  console.log(`${msg}\nbrowser tests SKIPPED.`);
  process.exit(0);
}
const specs = existsSync('tests/e2e') ? readdirSync('tests/e2e').filter((f) => f.endsWith('.e2e.ts')) : [];
if (specs.length === 0) {
  console.log('browser tests: none written yet');
  process.exit(0);
}
const r = spawnSync(
  'npx',
  [
    'vitest',
    'run',
    '-c',
    'tests/e2e/vitest.e2e.config.ts',
    '--reporter=default',
    '--reporter=json',
    '--outputFile.json=test-artifacts/e2e.json',
  ],
  { stdio: 'inherit' },
);
process.exit(r.status ?? 1);
