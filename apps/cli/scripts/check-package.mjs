#!/usr/bin/env node
// The CLI installs like a real one: `npm pack` in apps/cli (its prepack builds the bundle) gives
// a tarball that installs into an empty folder with `npm install ./that.tgz`, offline, and
// `npx loopwright --help` and a small analysis run there. A stage of `npm test`
// (`npm run test:package` alone). Exit code 0 when all of that holds.
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const CLI = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const t0 = performance.now();

// The npm settings of an enclosing `npm test` / `npm run` (workspace, prefix, ...) must not leak
// into the installs below, which stand for a user's own folder.
const env = Object.fromEntries(Object.entries(process.env).filter(([k]) => !/^npm_/i.test(k)));
env.npm_config_offline = 'true';
env.npm_config_audit = 'false';
env.npm_config_fund = 'false';
env.npm_config_update_notifier = 'false';

function run(cmd, args, cwd) {
  const r = spawnSync(cmd, args, { cwd, env, encoding: 'utf8', timeout: 180_000 });
  if (r.status !== 0) {
    throw new Error(
      `${cmd} ${args.join(' ')} (in ${cwd}) failed with ${r.error?.message ?? `exit code ${r.status}`}\n${r.stdout ?? ''}${r.stderr ?? ''}`,
    );
  }
  return r.stdout;
}

const work = mkdtempSync(join(tmpdir(), 'loopwright-package-'));
try {
  run('npm', ['pack', '--pack-destination', work, '--silent'], CLI);
  const tarball = readdirSync(work).find((f) => f.endsWith('.tgz'));
  if (!tarball) throw new Error(`npm pack wrote no tarball into ${work}`);
  const user = join(work, 'empty-folder');
  mkdirSync(user);
  run('npm', ['install', `../${tarball}`], user);
  const help = run('npx', ['loopwright', '--help'], user);
  if (!/^loopwright — /.test(help) || !help.includes('margins')) throw new Error(`unexpected --help output:\n${help}`);
  const margins = run('npx', ['loopwright', 'margins', '--loop', '4/(s+1)^3', '--json'], user);
  // 4/(s+1)^3: phase −180° at ω = √3, where |L| = 4/8, so the gain margin is 2 (analytic).
  const gm = JSON.parse(margins).gainMargin;
  if (!(Math.abs(gm - 2) < 1e-9)) throw new Error(`installed CLI: gain margin of 4/(s+1)^3 is ${gm}, expected 2`);
  const files = run('npm', ['ls', '--parseable', '--all'], user).trim().split('\n').length - 1;
  console.log(
    `installable CLI: ${tarball} installs offline into an empty folder (${files} package, no dependencies) and runs; ${((performance.now() - t0) / 1000).toFixed(1)} s`,
  );
} catch (err) {
  console.error(`installable CLI: FAILED\n${err instanceof Error ? err.message : String(err)}`);
  process.exitCode = 1;
} finally {
  rmSync(work, { recursive: true, force: true });
}
