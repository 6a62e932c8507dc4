import type { Command } from '../commands.js';

// Placeholder until the report command is built; it is replaced whole.
export const report: Command = {
  summary: '(report is not built yet)',
  usage: 'falciform report',
  async run() {
    throw new Error('falciform report is not built yet');
  },
};
