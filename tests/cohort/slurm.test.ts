import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateCohort } from '../../demo-data/cohort.js';
import { startCluster } from './slurm-cluster.js';

// docs/cluster.md's job array (scripts/slurm/): N tasks `falciform batch … --shard $SLURM_ARRAY_TASK_ID/N`
// (sbatch --array=0-(N-1): task ids 0 … N−1, Slurm's sbatch manual, common practice) and a merge job
// after them (--dependency=afterok). Shards 0 … N−1 merged must equal the unsharded batch.

const SHARDS = 3;
const TABLES = ['case-form.csv', 'status.csv', 'sdtm/tu.csv', 'sdtm/tr.csv', 'sdtm/rs.csv', 'sdtm/supptu.csv', 'case-form-dictionary.csv'];
const FALCIFORM = `${process.execPath} ${resolve('bin/falciform.js')}`;

let dir: string;
let cohort: string;
let local: string;

const tables = (out: string) => Object.fromEntries(TABLES.map((t) => [t, readFileSync(join(out, t), 'utf8')]));

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'falciform-slurm-'));
  cohort = join(dir, 'cohort');
  await generateCohort(cohort, 5, { broken: true });
  local = join(dir, 'local');
  const r = spawnSync(process.execPath, ['bin/falciform.js', 'batch', cohort, '--out', local, '--jobs', '2'], { encoding: 'utf8' });
  expect(r.status, r.stderr).toBe(0);
}, 180_000);

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('Slurm job array', () => {
  it("runs the array's task commands with SLURM_ARRAY_TASK_ID 0 … N−1 and the merge: tables equal the unsharded batch", () => {
    const out = join(dir, 'tasks');
    const env = { ...process.env, COHORT: cohort, OUT: out, SHARDS: String(SHARDS), FALCIFORM, SLURM_CPUS_PER_TASK: '1' };
    const taken: string[] = [];
    for (let k = 0; k < SHARDS; k++) {
      const r = spawnSync('bash', ['scripts/slurm/shard.sbatch'], { env: { ...env, SLURM_ARRAY_TASK_ID: String(k) }, encoding: 'utf8' });
      expect(r.status, r.stderr).toBe(0);
      const m = /^Shard (\d+)\/(\d+): (\d+) of (\d+) patient/m.exec(r.stdout);
      expect(m?.slice(1, 3)).toEqual([String(k), String(SHARDS)]);
      taken.push(m![3]);
    }
    // The shares add up to the cohort: each patient in exactly one task.
    expect(taken.reduce((a, n) => a + Number(n), 0)).toBe(5);
    const merged = spawnSync('bash', ['scripts/slurm/merge.sbatch'], { env, encoding: 'utf8' });
    expect(merged.status, merged.stderr).toBe(0);
    expect(tables(out)).toEqual(tables(local));
    // A task id past the array (K = N) is a usage error, as the contract says.
    const past = spawnSync('bash', ['scripts/slurm/shard.sbatch'], { env: { ...env, SLURM_ARRAY_TASK_ID: String(SHARDS) }, encoding: 'utf8' });
    expect(past.status).toBe(2);
  }, 240_000);

  it('submits the array and the dependent merge to a one-node cluster started here, and gets the same tables', async () => {
    const cluster = await startCluster(join(dir, 'cluster'));
    if ('problem' in cluster) {
      // Only this part depends on the machine; the shard arithmetic above always runs.
      console.warn(`Slurm part not run: the single-node cluster could not start on this machine: ${cluster.problem}`);
      return;
    }
    try {
      const out = join(dir, 'cluster-out');
      const env = { ...cluster.env, FALCIFORM, SBATCH_OPTS: `--chdir=${dir} --cpus-per-task=1` };
      const sub = spawnSync('bash', ['scripts/slurm/submit.sh', cohort, out, String(SHARDS)], { env, encoding: 'utf8' });
      expect(sub.status, sub.stderr).toBe(0);
      const ids = /^array job (\d+) \(3 tasks\), merge job (\d+)$/m.exec(sub.stdout);
      expect(ids, sub.stdout).not.toBeNull();
      const merge = ids![2];
      const deadline = Date.now() + 240_000;
      let state = '';
      while (Date.now() < deadline) {
        const show = spawnSync('scontrol', ['show', 'job', merge, '-o'], { env, encoding: 'utf8' }).stdout ?? '';
        state = /JobState=(\S+)/.exec(show)?.[1] ?? state;
        if (['COMPLETED', 'FAILED', 'CANCELLED', 'TIMEOUT', 'NODE_FAIL', 'OUT_OF_MEMORY'].includes(state)) break;
        await new Promise((r) => setTimeout(r, 1000));
      }
      const logs = () => spawnSync('sh', ['-c', `tail -n 5 ${dir}/falciform-*.log`], { encoding: 'utf8' }).stdout;
      expect(state, logs()).toBe('COMPLETED');
      expect(tables(out)).toEqual(tables(local));
    } finally {
      cluster.stop();
    }
  }, 420_000);
});
