import type { Command } from '../io.ts';

// Placeholder until the owning issue lands this command; it refuses with exit code 1.
export const marginsCommand: Command = {
  name: 'margins',
  summary: '(being built)',
  help: 'loopwright margins: not available yet',
  async run(_argv, io) {
    io.stderr('loopwright margins: not available yet\n');
    return 1;
  },
};
