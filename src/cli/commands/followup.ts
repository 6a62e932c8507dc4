import type { Command } from '../commands.js';

// Placeholder until the followup command is built; it is replaced whole.
export const followup: Command = {
  summary: '(followup is not built yet)',
  usage: 'falciform followup',
  async run() {
    throw new Error('falciform followup is not built yet');
  },
};
