import type { Command } from '../io.ts';

// Placeholder until the owning issue lands this command; it refuses with exit code 1.
export const simulateCommand: Command = {
  name: 'simulate',
  summary: '(being built)',
  help: 'loopwright simulate: not available yet',
  async run(_argv, io) {
    io.stderr('loopwright simulate: not available yet\n');
    return 1;
  },
};
