import type { Command } from '../commands.js';

// Placeholder until the inspect command is built; it is replaced whole.
export const inspect: Command = {
  summary: '(inspect is not built yet)',
  usage: 'falciform inspect',
  async run() {
    throw new Error('falciform inspect is not built yet');
  },
};
