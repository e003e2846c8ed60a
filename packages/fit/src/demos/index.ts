import { supplyValveBump, supplyValveBumpCsv } from './supply-valve-bump.ts';

export { seededGaussian, seededUniform } from './seeded-noise.ts';
export { supplyValveBump, supplyValveBumpCsv } from './supply-valve-bump.ts';

/**
 * Demo test logs of our own. The TS generators are the source; the committed CSV files beside
 * them (what users open) are written by packages/fit/scripts/write-demo-logs.ts and a test
 * checks that they match byte for byte.
 */
export const demoTestLogs: { id: string; title: string; fileName: string; csv: () => string }[] = [
  { id: supplyValveBump.id, title: supplyValveBump.title, fileName: supplyValveBump.fileName, csv: supplyValveBumpCsv },
];
