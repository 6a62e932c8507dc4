/** The falciform commands; each module in commands/ exports one. */
export interface Command {
  summary: string;
  usage: string;
  run(argv: readonly string[]): Promise<void>;
}

export const commands: Record<string, Command> = {};
