// The lint rules that keep the packages pure and the package boundaries in place actually bite:
// ESLint's Node API lints virtual files (nothing is written) under the repo's own
// eslint.config.js, as `npm run lint` does.
import { fileURLToPath } from 'node:url';
import { ESLint } from 'eslint';
import { beforeAll, describe, expect, it } from 'vitest';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
let eslint: ESLint;

/** Rule ids (with the offending line) that ESLint reports for `code` placed at `file`. */
async function findings(file: string, code: string): Promise<string[]> {
  const [result] = await eslint.lintText(code, { filePath: `${ROOT}${file}` });
  return result.messages.map((m) => `${m.ruleId ?? 'fatal'}@${m.line}`);
}

beforeAll(() => {
  eslint = new ESLint({ cwd: ROOT });
});

describe('packages/* are pure', () => {
  const impure = [
    "import { readFileSync } from 'node:fs';", // 1
    "import path from 'path';", // 2
    "import { useState } from 'react';", // 3
    'export const title = (): string => document.title;', // 4
    'export const env = (): unknown => process.env;', // 5
    'export const w = (): unknown => window.innerWidth;', // 6
    'export const use = [readFileSync, path, useState];', // 7
  ].join('\n');

  it('a pure package that imports node:fs or touches document fails the lint', async () => {
    const found = await findings('packages/lti/src/virtual-probe.ts', impure);
    expect(found).toEqual(
      expect.arrayContaining([
        'no-restricted-imports@1',
        'no-restricted-imports@2',
        'no-restricted-imports@3',
        'no-restricted-globals@4',
        'no-restricted-globals@5',
        'no-restricted-globals@6',
      ]),
    );
  });

  it('the same rules hold for the packages being built now', async () => {
    for (const pkg of ['graph', 'sim', 'fit', 'tune', 'sampled', 'study']) {
      const found = await findings(`packages/${pkg}/src/deep/virtual-probe.ts`, impure);
      expect(found, pkg).toEqual(expect.arrayContaining(['no-restricted-imports@1', 'no-restricted-globals@4']));
    }
  });

  it('portable code passes: other packages through their entry, performance.now, plain maths', async () => {
    const code = [
      "import { poly } from '@loopwright/lti';",
      "import { sameHere } from './sibling.ts';",
      'export const f = (): number => performance.now() + Math.hypot(...poly.fromDescending([1, 2])) + sameHere;',
    ].join('\n');
    expect(await findings('packages/graph/src/analysis/virtual-probe.ts', code)).toEqual([]);
  });

  it('the CLI may use Node, the editor may use the DOM, and neither rule reaches them', async () => {
    expect(
      await findings('apps/cli/src/virtual-probe.ts', "import { readFileSync } from 'node:fs';\nexport const r = readFileSync;"),
    ).toEqual([]);
    expect(await findings('apps/editor/src/virtual-probe.ts', 'export const t = (): string => document.title;')).toEqual([]);
    expect(
      await findings('apps/editor/src/virtual-probe.ts', "import { readFileSync } from 'node:fs';\nexport const r = readFileSync;"),
    ).toEqual(['no-restricted-imports@1']);
  });
});

describe('packages are reached only through their entries', () => {
  it('a relative path out of a package or app is refused, naming the entry to use', async () => {
    const [result] = await eslint.lintText("import { poly } from '../../lti/src/poly.ts';\nexport const p = poly;", {
      filePath: `${ROOT}packages/graph/src/virtual-probe.ts`,
    });
    expect(result.messages.map((m) => m.ruleId)).toEqual(['loopwright/boundaries']);
    expect(result.messages[0].message).toContain('@loopwright/lti');
    expect(await findings('apps/cli/src/commands/virtual-probe.ts', "export { main } from '../../../editor/src/main.tsx';")).toEqual([
      'loopwright/boundaries@1',
    ]);
  });

  it("a package's files are reached only through its entry; the testing entry only from tests", async () => {
    expect(await findings('apps/cli/src/virtual-probe.ts', "export { poly } from '@loopwright/lti/src/poly.ts';")).toEqual([
      'loopwright/boundaries@1',
    ]);
    expect(await findings('apps/cli/src/virtual-probe.ts', "export { diagramOf } from '@loopwright/graph/testing';")).toEqual([
      'loopwright/boundaries@1',
    ]);
    expect(await findings('apps/cli/src/virtual-probe.test.ts', "export { diagramOf } from '@loopwright/graph/testing';")).toEqual([]);
    expect(await findings('tests/reference/virtual-probe.test.ts', "export { buildDiagram } from '@loopwright/sim/testing';")).toEqual([]);
    expect(
      await findings(
        'tests/reference/virtual-probe.test.ts',
        "export { buildDiagram } from '../../packages/sim/src/test-support/build-diagram.ts';",
      ),
    ).toEqual(['loopwright/boundaries@1']);
  });

  it('a suppression that suppresses nothing is itself an error', async () => {
    const found = await findings(
      'packages/lti/src/virtual-probe.ts',
      '// eslint-disable-next-line @typescript-eslint/no-explicit-any\nexport const x = 1;',
    );
    expect(found).toEqual(['fatal@1']);
  });
});
