import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';

// The command line as a user runs it: the compiled bin script, exit codes per the contracts.
function falciform(...args: string[]) {
  return spawnSync(process.execPath, ['bin/falciform.js', ...args], { encoding: 'utf8' });
}

describe('falciform command line', () => {
  it('prints help with every command and the caution', () => {
    const r = falciform('--help');
    expect(r.status).toBe(0);
    for (const c of ['inspect', 'segments', 'analyze', 'followup', 'report']) expect(r.stdout).toContain(`  ${c} `);
    expect(r.stdout).toMatch(/not a medical device/);
  });

  it('exits 2 on an unknown command, with one line on stderr', () => {
    const r = falciform('frobnicate');
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stdout).toBe('');
  });

  it('prints its version', () => {
    const r = falciform('--version');
    expect(r.status).toBe(0);
    expect(r.stdout.trim()).toMatch(/^\d+\.\d+\.\d+$/);
  });
});
