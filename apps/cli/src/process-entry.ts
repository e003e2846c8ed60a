// The process around main(): real standard streams and files, and the exit code. This is the
// entry that apps/cli/scripts/build.mjs bundles into dist/loopwright.mjs (run by bin/); tests
// call main() in-process with a fake io instead.
import { readFile, writeFile } from 'node:fs/promises';
import { main } from './main.ts';

process.exitCode = await main(process.argv.slice(2), {
  stdout: (s) => process.stdout.write(s),
  stderr: (s) => process.stderr.write(s),
  readFile: (p) => readFile(p, 'utf8'),
  writeFile: (p, text) => writeFile(p, text),
});
