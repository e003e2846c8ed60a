import type { Command } from '../io.ts';

// Placeholder until the owning issue lands this command; it refuses with exit code 1.
export const checkCommand: Command = {
  name: 'check',
  summary: '(being built)',
  help: 'loopwright check: not available yet',
  async run(_argv, io) {
    io.stderr('loopwright check: not available yet\n');
    return 1;
  },
};
