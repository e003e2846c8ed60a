// Writes the demo test logs (CSV) from their generators. Run after changing a generator:
//   npx tsx packages/fit/scripts/write-demo-logs.ts
// (A test checks that the committed files equal what this writes.)
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { demoTestLogs } from '../src/demos/index.ts';

for (const demo of demoTestLogs) {
  writeFileSync(fileURLToPath(new URL(`../src/demos/${demo.fileName}`, import.meta.url)), demo.csv());
}
console.log(`wrote ${demoTestLogs.length} demo test log(s)`);
