// Test-only entry of the CLI (`@loopwright/cli/testing`): main() with a fake io, for tests that
// compare the command line with the editor worker.
export { main } from './main.ts';
export type { CliIo } from './io.ts';
export { compileRunAndCheck, hasCc } from './c-check.ts';
