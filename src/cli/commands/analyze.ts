import type { Command } from '../commands.js';

// Placeholder until the analyze command is built; it is replaced whole.
export const analyze: Command = {
  summary: '(analyze is not built yet)',
  usage: 'falciform analyze',
  async run() {
    throw new Error('falciform analyze is not built yet');
  },
};
