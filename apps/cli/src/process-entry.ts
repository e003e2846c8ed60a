// The entry that apps/cli/scripts/build.mjs bundles into dist/loopwright.mjs (run by bin/):
// the real process around main() (node-io.ts); tests call main() in-process with a fake io.
import { runFromProcess } from './node-io.ts';

await runFromProcess();
