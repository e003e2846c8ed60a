import type { Command } from '../io.ts';

// Placeholder until the owning issue lands this command; it refuses with exit code 1.
export const locusCommand: Command = {
  name: 'locus',
  summary: '(being built)',
  help: 'loopwright locus: not available yet',
  async run(_argv, io) {
    io.stderr('loopwright locus: not available yet\n');
    return 1;
  },
};
