import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

/**
 * Runs once before the unit tests: compiles the core, shell and command line to build/ (the tests
 * that run `node bin/falciform.js` use it) and makes the demo patients when they are missing.
 * Doing it here, not in each test file, keeps parallel test files from rebuilding under each other.
 */
export default function setup(): void {
  const run = (cmd: string, args: string[]) => {
    const r = spawnSync(cmd, args, { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed:\n${r.stdout}${r.stderr}`);
  };
  run('npx', ['tsc', '-p', 'tsconfig.node.json']);
  if (!existsSync('demo-data/index.json')) run(process.execPath, ['build/demo-data/generate.js']);
}
