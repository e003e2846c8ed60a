import type { Command } from '../io.ts';

// Placeholder until the owning issue lands this command; it refuses with exit code 1.
export const loopsCommand: Command = {
  name: 'loops',
  summary: '(being built)',
  help: 'loopwright loops: not available yet',
  async run(_argv, io) {
    io.stderr('loopwright loops: not available yet\n');
    return 1;
  },
};
