/**
 * Compiling generated C with the system compiler and checking its output against a test vector,
 * for the tests that do so (the export command's files and the code generator's). Node only;
 * test-only (reached through `@loopwright/cli/testing`, never from main).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { expect } from 'vitest';

/** Whether a C compiler `cc` is on the PATH. */
export const hasCc = spawnSync('cc', ['--version'], { encoding: 'utf8' }).status === 0;

/**
 * Writes `files` (name → text) to a fresh folder, compiles the `sources` among them with strict
 * C99 warnings as errors, runs the program, and checks that it printed `expected` line by line
 * to 1e-9 (relative above 1), then a closing "worst …" line, and exited 0.
 */
export function compileRunAndCheck(files: Record<string, string>, sources: readonly string[], expected: readonly number[]): void {
  const dir = mkdtempSync(join(tmpdir(), 'loopwright-cc-'));
  try {
    for (const [name, text] of Object.entries(files)) writeFileSync(join(dir, name), text);
    const exe = join(dir, 'check');
    const cc = spawnSync(
      'cc',
      ['-std=c99', '-pedantic', '-Wall', '-Wextra', '-Werror', '-O2', '-o', exe, ...sources.map((s) => join(dir, s)), '-lm'],
      {
        encoding: 'utf8',
      },
    );
    expect(cc.stderr).toBe('');
    expect(cc.status).toBe(0);
    const run = spawnSync(exe, [], { encoding: 'utf8' });
    expect(run.status).toBe(0);
    const lines = run.stdout.trim().split('\n');
    expect(lines.pop()).toMatch(/^worst /);
    const got = lines.map(Number);
    expect(got).toHaveLength(expected.length);
    got.forEach((u, k) => expect(Math.abs(u - expected[k])).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(expected[k]))));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
