import { analyze } from './commands/analyze.js';
import { batch } from './commands/batch.js';
import { convert } from './commands/convert.js';
import { followup } from './commands/followup.js';
import { inspect } from './commands/inspect.js';
import { lesion } from './commands/lesion.js';
import { liver } from './commands/liver.js';
import { report } from './commands/report.js';
import { segments } from './commands/segments.js';

/** One falciform command; each lives in its own module under commands/. */
export interface Command {
  summary: string;
  usage: string;
  run(argv: readonly string[]): Promise<void>;
}

export const commands: Record<string, Command> = { inspect, segments, analyze, followup, report, batch, convert, liver, lesion };
