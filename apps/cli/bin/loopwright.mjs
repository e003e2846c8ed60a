#!/usr/bin/env node
// Runs the TypeScript CLI directly through tsx, so that `npx loopwright` works after `npm ci`
// with no build step.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../src/main.ts');
const code = await main(process.argv.slice(2), {
  stdout: (s) => process.stdout.write(s),
  stderr: (s) => process.stderr.write(s),
  readFile: async (p) => (await import('node:fs/promises')).readFile(p, 'utf8'),
  writeFile: async (p, text) => (await import('node:fs/promises')).writeFile(p, text),
});
process.exitCode = code;
