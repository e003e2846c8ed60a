// The generated C is compiled with the system C compiler and run on a test vector (with a
// coefficient change half-way); every output must agree with the reference executor to 1e-9.
// Skipped, with a plain message, where no `cc` is installed.
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { cTestProgram, exerciseInput, generateC, makeTestVector } from '@loopwright/sampled';
import { CASES } from '@loopwright/sampled/testing';
import { compileRunAndCheck, hasCc } from '@loopwright/cli/testing';

if (!hasCc) console.log('sampled code generation: no C compiler (cc) found, so the generated C is not compiled here');

describe.skipIf(!hasCc)('generated C compiled with cc runs the test vector to 1e-9', () => {
  for (const c of CASES) {
    it(c.label, () => {
      const ctrl = c.make();
      const name = 'axis_ctrl';
      const v = makeTestVector(ctrl, exerciseInput(500, 3), {
        name,
        initialOutput: -0.3,
        retunes: [{ atSample: 260, coefficients: c.retune().coefficients }],
      });
      const g = generateC(ctrl, name);
      const main = cTestProgram(ctrl, v, name);
      compileRunAndCheck(Object.fromEntries([g.header, g.source, main].map((f) => [f.path, f.text])), [main.path, g.source.path], v.output);
    });
  }
  it('the check program fails on a wrong expected output', () => {
    const ctrl = CASES[1].make();
    const v = makeTestVector(ctrl, exerciseInput(50, 3), { name: 'axis_ctrl' });
    v.output[20] += 1e-6;
    const dir = mkdtempSync(join(tmpdir(), 'loopwright-cc-'));
    try {
      const g = generateC(ctrl, 'axis_ctrl');
      const main = cTestProgram(ctrl, v, 'axis_ctrl');
      for (const f of [g.header, g.source, main]) writeFileSync(join(dir, f.path), f.text);
      const exe = join(dir, 'check');
      expect(spawnSync('cc', ['-std=c99', '-o', exe, join(dir, main.path), join(dir, g.source.path), '-lm']).status).toBe(0);
      expect(spawnSync(exe, []).status).toBe(1);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
