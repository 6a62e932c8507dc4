// npm test: the system tools the suite uses (installed when root on Debian/Ubuntu), then typecheck,
// lint, unit tests and end-to-end tests, the total time, and one closing line "N passed, N failed"
// that sums them all. Exits non-zero when anything failed or was skipped.
import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, rmSync } from 'node:fs';
import { ensureSystemTools } from './system-tools.mjs';

const startedAt = Date.now();
console.log('== system tools');
if (!ensureSystemTools()) process.exit(1);

const results = { passed: 0, failed: 0, skipped: 0 };
mkdirSync('test-results', { recursive: true });

function step(title, cmd, args) {
  console.log(`\n== ${title}: ${cmd} ${args.join(' ')}`);
  const r = spawnSync(cmd, args, { stdio: 'inherit', shell: process.platform === 'win32' });
  return r.status === 0;
}

function check(title, cmd, args) {
  if (step(title, cmd, args)) results.passed++;
  else results.failed++;
}

function vitest(project) {
  const out = `test-results/${project}.json`;
  rmSync(out, { force: true });
  const ok = step(`${project} tests`, 'npx', [
    'vitest', 'run', '--project', project, '--reporter=default', '--reporter=json', `--outputFile.json=${out}`,
  ]);
  let report;
  try {
    report = JSON.parse(readFileSync(out, 'utf8'));
  } catch {
    // The runner died before reporting: count it as one failure so the run cannot pass.
    results.failed++;
    return;
  }
  results.passed += report.numPassedTests;
  results.failed += report.numFailedTests;
  results.skipped += report.numPendingTests + report.numTodoTests;
  if (!ok && report.numFailedTests === 0) results.failed++; // e.g. a test file that failed to load
}

check('typecheck', 'npx', ['tsc', '-p', 'tsconfig.node.json', '--noEmit']);
check('typecheck renderer', 'npx', ['tsc', '-p', 'tsconfig.renderer.json']);
check('typecheck tests', 'npx', ['tsc', '-p', 'tsconfig.tests.json']);
check('lint', 'npx', ['eslint', '.']);
check('build', 'npm', ['run', 'build', '--silent']);
vitest('unit');
vitest('e2e');

const { passed, failed, skipped } = results;
const seconds = Math.round((Date.now() - startedAt) / 1000);
console.log(`\nTotal time ${Math.floor(seconds / 60)} min ${seconds % 60} s`);
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exitCode = failed > 0 || skipped > 0 ? 1 : 0;
