import type { Command } from '../io.ts';
import { locusCommand } from './locus.ts';
import { marginsCommand } from './margins.ts';
import { checkCommand } from './check.ts';
import { reduceCommand } from './reduce.ts';
import { loopsCommand } from './loops.ts';
import { simulateCommand } from './simulate.ts';
import { fitCommand } from './fit.ts';
import { tuneCommand } from './tune.ts';
import { reportCommand } from './report.ts';
import { exportCommand } from './export.ts';

/** Every command, in the order `loopwright --help` lists them. */
export const commands: Command[] = [
  locusCommand,
  marginsCommand,
  checkCommand,
  reduceCommand,
  loopsCommand,
  simulateCommand,
  fitCommand,
  tuneCommand,
  reportCommand,
  exportCommand,
];
