import type { Command } from '../io.ts';

// Placeholder until the owning issue lands this command; it refuses with exit code 1.
export const reduceCommand: Command = {
  name: 'reduce',
  summary: '(being built)',
  help: 'loopwright reduce: not available yet',
  async run(_argv, io) {
    io.stderr('loopwright reduce: not available yet\n');
    return 1;
  },
};
