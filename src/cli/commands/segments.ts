import type { Command } from '../commands.js';

// Placeholder until the segments command is built; it is replaced whole.
export const segments: Command = {
  summary: '(segments is not built yet)',
  usage: 'falciform segments',
  async run() {
    throw new Error('falciform segments is not built yet');
  },
};
