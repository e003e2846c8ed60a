#!/usr/bin/env node
// `npm test`: the CLI bundle rebuilt (so nothing runs a stale one), type-check (tsc -b, every
// project), lint, the formatter's check, unit + reference tests (vitest), the installable-CLI check, then browser tests
// (tests/e2e/run.mjs).
// Prints one closing line "N passed, N failed" over everything it ran.
import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, existsSync } from 'node:fs';

mkdirSync('test-artifacts', { recursive: true });
let passed = 0;
let failed = 0;
let ok = true;

// Each stage has a wall-clock cap, so that a runaway test fails the run loudly instead of
// holding CI until its own limit.
function run(label, cmd, args, minutes = 20) {
  console.log(`\n=== ${label}: ${cmd} ${args.join(' ')}`);
  const r = spawnSync(cmd, args, { stdio: 'inherit', env: process.env, timeout: minutes * 60_000, killSignal: 'SIGKILL' });
  if (r.error) console.error(`${label}: stopped after ${minutes} min (${r.error.message})`);
  if (r.status !== 0) ok = false;
  return r.status === 0;
}

function count(jsonFile) {
  if (!existsSync(jsonFile)) return;
  const j = JSON.parse(readFileSync(jsonFile, 'utf8'));
  passed += j.numPassedTests ?? 0;
  failed += j.numFailedTests ?? 0;
}

if (!run('CLI bundle', 'npm', ['run', '--silent', 'build:cli'], 5)) failed += 1;
if (!run('type-check', 'npm', ['run', '--silent', 'typecheck'])) failed += 1;
if (!run('lint', 'npm', ['run', '--silent', 'lint'])) failed += 1;
if (!run('format', 'npm', ['run', '--silent', 'format:check'], 5)) failed += 1;
run('unit and reference tests', 'npx', [
  'vitest',
  'run',
  '--reporter=default',
  '--reporter=json',
  '--outputFile.json=test-artifacts/unit.json',
]);
count('test-artifacts/unit.json');
if (!run('installable CLI', 'npm', ['run', '--silent', 'test:package'], 5)) failed += 1;
run('browser tests', 'node', ['tests/e2e/run.mjs']);
count('test-artifacts/e2e.json');

console.log(`\n${passed} passed, ${failed} failed`);
process.exit(ok && failed === 0 ? 0 : 1);
