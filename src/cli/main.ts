import { CAUTION } from '../caution.js';
import { isFalciformError, oneLine } from '../errors.js';
import { UsageError } from './args.js';
import { commands } from './commands.js';
import { VERSION } from '../version.js';

const HELP = `falciform ${VERSION} — follow liver lesions across visits by Couinaud segment

Usage: falciform <command> [options]

Commands:
${Object.entries(commands)
  .map(([name, c]) => `  ${name.padEnd(10)} ${c.summary}\n             ${c.usage}`)
  .join('\n')}

Exit codes: 0 done, 2 usage error, 3 bad input.
${CAUTION}
`;

/** Runs one command line; returns the exit code. Bad input gives one stderr line, never a stack trace. */
export async function run(argv: readonly string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    process.stdout.write(HELP);
    return name === undefined ? 2 : 0;
  }
  if (name === '--version') {
    process.stdout.write(`${VERSION}\n`);
    return 0;
  }
  const command = commands[name];
  if (!command) {
    process.stderr.write(`${oneLine(`falciform: unknown command "${name}" (see falciform --help)`)}\n`);
    return 2;
  }
  try {
    await command.run(rest);
    return 0;
  } catch (e) {
    if (e instanceof UsageError) {
      process.stderr.write(`${oneLine(`falciform ${name}: ${e.message}`)}\nusage: ${command.usage}\n`);
      return 2;
    }
    if (isFalciformError(e)) {
      process.stderr.write(`${oneLine(`falciform ${name}: ${e.message}`)}\n`);
      return 3;
    }
    throw e;
  }
}
