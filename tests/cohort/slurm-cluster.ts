import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync, chmodSync } from 'node:fs';
import { createServer } from 'node:net';
import { cpus, hostname } from 'node:os';
import { join } from 'node:path';

/**
 * A one-node Slurm cluster on loopback for the tests, from Debian's slurm-wlm and munge: its own
 * munge key and socket, slurm.conf, state and spool folders, all in `dir`, ports picked free, daemons
 * run as root. `stop` shuts them down by their pid files. When any step fails the cluster is stopped
 * again and the reason returned, so the caller can say why that part could not run.
 */
export interface TestCluster {
  env: NodeJS.ProcessEnv;
  stop(): void;
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const a = s.address();
      s.close(() => (typeof a === 'object' && a ? resolve(a.port) : reject(new Error('no port'))));
    });
  });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function pidOf(file: string): number | null {
  if (!existsSync(file)) return null;
  const pid = Number(readFileSync(file, 'utf8').trim());
  return Number.isInteger(pid) && pid > 1 ? pid : null;
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

export async function startCluster(dir: string): Promise<TestCluster | { problem: string }> {
  if (process.getuid?.() !== 0) return { problem: 'the daemons must be started as root, and the tests do not run as root' };
  for (const d of ['munge', 'state', 'spool']) mkdirSync(join(dir, d), { recursive: true });
  chmodSync(join(dir, 'munge'), 0o700);
  const node = hostname().split('.')[0];
  const [ctldPort, slurmdPort] = [await freePort(), await freePort()];
  const conf = join(dir, 'slurm.conf');
  const env = { ...process.env, SLURM_CONF: conf };
  const pidFiles = { munged: join(dir, 'munge/munged.pid'), slurmctld: join(dir, 'slurmctld.pid'), slurmd: join(dir, 'slurmd.pid') };

  const stop = () => {
    spawnSync('scontrol', ['shutdown'], { env, timeout: 10_000 });
    for (const f of [pidFiles.slurmd, pidFiles.slurmctld, pidFiles.munged]) {
      const pid = pidOf(f);
      if (pid === null) continue;
      for (let n = 0; n < 50 && alive(pid); n++) {
        if (f === pidFiles.munged || n === 20) process.kill(pid, n >= 20 ? 'SIGKILL' : 'SIGTERM');
        spawnSync('sleep', ['0.1']);
      }
    }
  };
  const fail = (problem: string) => {
    stop();
    return { problem };
  };

  const key = join(dir, 'munge/munge.key');
  const mk = spawnSync('mungekey', ['--create', '--keyfile', key], { encoding: 'utf8' });
  if (mk.status !== 0) return fail(`mungekey failed: ${mk.stderr || mk.error?.message}`);
  const munged = spawnSync('munged', [
    '--force', '--socket', join(dir, 'munge/socket'), '--key-file', key, '--pid-file', pidFiles.munged,
    '--log-file', join(dir, 'munge/munged.log'), '--seed-file', join(dir, 'munge/seed'),
  ], { encoding: 'utf8' });
  if (munged.status !== 0) return fail(`munged did not start: ${munged.stderr || munged.error?.message}`);

  writeFileSync(conf, [
    'ClusterName=falciformtest',
    `SlurmctldHost=${node}(127.0.0.1)`,
    'SlurmUser=root', 'SlurmdUser=root',
    'AuthType=auth/munge', `AuthInfo=socket=${join(dir, 'munge/socket')}`, 'CredType=cred/munge',
    `StateSaveLocation=${join(dir, 'state')}`, `SlurmdSpoolDir=${join(dir, 'spool')}`,
    `SlurmctldPidFile=${pidFiles.slurmctld}`, `SlurmdPidFile=${pidFiles.slurmd}`,
    `SlurmctldPort=${ctldPort}`, `SlurmdPort=${slurmdPort}`,
    `SlurmctldLogFile=${join(dir, 'slurmctld.log')}`, `SlurmdLogFile=${join(dir, 'slurmd.log')}`,
    'ProctrackType=proctrack/linuxproc', 'TaskPlugin=task/none', 'SchedulerType=sched/builtin',
    'SelectType=select/cons_tres', 'ReturnToService=2', 'MpiDefault=none', 'JobCompType=jobcomp/none',
    'AccountingStorageType=accounting_storage/none',
    `NodeName=${node} NodeAddr=127.0.0.1 CPUs=${cpus().length} RealMemory=1000 State=UNKNOWN`,
    'PartitionName=main Nodes=ALL Default=YES MaxTime=INFINITE State=UP',
    '',
  ].join('\n'));

  const ctld = spawnSync('slurmctld', ['-i'], { env, encoding: 'utf8', timeout: 30_000 });
  if (ctld.status !== 0) return fail(`slurmctld did not start: ${ctld.stderr || ctld.error?.message}`);
  const slurmd = spawnSync('slurmd', ['-N', node], { env, encoding: 'utf8', timeout: 30_000 });
  if (slurmd.status !== 0) return fail(`slurmd did not start: ${slurmd.stderr || slurmd.error?.message}`);
  const deadline = Date.now() + 30_000;
  let state = '';
  while (Date.now() < deadline) {
    state = spawnSync('sinfo', ['-h', '-o', '%t'], { env, encoding: 'utf8', timeout: 10_000 }).stdout?.trim() ?? '';
    if (state === 'idle') return { env, stop };
    await sleep(500);
  }
  return fail(`the node did not become idle within 30 s (sinfo says "${state}")`);
}
