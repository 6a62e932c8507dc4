import { availableParallelism } from 'node:os';
import { mkdir, readdir, readFile, unlink } from 'node:fs/promises';
import { basename, join, resolve } from 'node:path';
import { Worker } from 'node:worker_threads';
import { CAUTION } from '../../caution.js';
import { mergeCohort, type CohortEntry } from '../../cohort/merge.js';
import { parsePatientResult, resultFileName } from '../../cohort/result.js';
import { parseShard, shareOf, type Shard } from '../../cohort/share.js';
import { badFile } from '../../errors.js';
import { optionalOption, parseArgs, requireOption, UsageError } from '../args.js';
import type { BatchOutcome, BatchTask } from '../batch-worker.js';
import { findManifests, patientInputs } from '../cohort-files.js';
import type { Command } from '../commands.js';
import { writeFileAtomic } from '../node-io.js';

const USAGE = 'falciform batch DIR --out DIR [--jobs N] [--shard K/N] [--merge-only] [--study ID]';

/**
 * Every patient (manifest.json) under DIR, each analysed in a worker thread, its result kept in
 * OUT/patients/ one file per patient; then the cohort tables. With --shard K/N only this task's fixed
 * share is analysed and no tables are written (the other shares may still be running): a last
 * `--merge-only` run writes them from every patient's result. Exit 0 once the batch ran, however many
 * patients failed (status.csv says which and why); exit 3 only when nothing could run.
 */
export const batch: Command = {
  summary: 'every manifest under DIR: resumable, shardable; cohort case form, status table and SDTM TU/TR/RS',
  usage: USAGE,
  async run(argv) {
    const args = parseArgs(argv, ['out', 'jobs', 'shard', 'study'], ['merge-only']);
    if (args.positional.length !== 1) throw new UsageError(args.positional.length === 0 ? 'name the cohort folder' : `unexpected argument "${args.positional[1]}"`);
    const root = args.positional[0];
    const out = requireOption(args, 'out');
    const jobs = jobsOption(optionalOption(args, 'jobs'));
    const shardText = optionalOption(args, 'shard');
    let shard: Shard | null = null;
    if (shardText !== undefined) {
      const parsed = parseShard(shardText);
      if ('problem' in parsed) throw new UsageError(parsed.problem);
      shard = parsed;
    }
    const mergeOnly = args.options.has('merge-only');
    if (mergeOnly && shard) throw new UsageError('--merge-only merges every share; give it without --shard');
    const study = optionalOption(args, 'study') ?? (basename(resolve(root)) || 'COHORT');

    const manifests = await findManifests(root, out);
    if (manifests.length === 0) throw badFile(root, 'holds no manifest.json (one per patient, in any sub-folder)');
    const patientsDir = join(out, 'patients');
    try {
      await mkdir(join(out, 'sdtm'), { recursive: true });
      await mkdir(patientsDir, { recursive: true });
    } catch (e) {
      throw badFile(out, `the output folder cannot be made: ${e instanceof Error ? e.message : String(e)}`);
    }
    // Only a run that owns the whole folder clears temporary files: a shard's may be another task's, mid-write.
    if (!shard && !mergeOnly) await removeLeftovers(patientsDir);

    const share = shard ? shareOf(manifests, shard) : manifests;
    const known = new Map<string, string>();
    const lines: string[] = [];
    if (!mergeOnly) {
      const tasks = share.map((m): BatchTask => ({ manifest: m, manifestPath: join(root, m), resultPath: join(patientsDir, resultFileName(m)) }));
      const outcomes = await runPool(tasks, jobs);
      for (const o of outcomes) if (o.sha256) known.set(o.manifest, o.sha256);
      const n = (k: BatchOutcome['outcome']) => outcomes.filter((o) => o.outcome === k).length;
      lines.push(
        `${shard ? `Shard ${shard.index}/${shard.count}: ` : ''}${tasks.length} of ${manifests.length} patient(s): ` +
          `${n('done')} done, ${n('unchanged')} unchanged, ${n('failed')} failed.`,
        ...outcomes.filter((o) => o.outcome === 'failed').map((o) => `  failed ${o.manifest}: ${o.reason}`),
      );
    }
    if (shard) {
      lines.push(`Results in ${patientsDir}; after every shard has run, write the cohort tables with`, `  falciform batch ${root} --out ${out} --merge-only`);
    } else {
      const entries: CohortEntry[] = [];
      for (const m of manifests) {
        const result = await readFile(join(patientsDir, resultFileName(m)), 'utf8').then(parsePatientResult, () => null);
        entries.push({ manifest: m, result, currentSha256: known.get(m) ?? (await patientInputs(join(root, m))).sha256 });
      }
      const { files, status } = mergeCohort(entries, study, new Date());
      for (const f of files) await writeFileAtomic(join(out, f.name), f.bytes);
      const notRun = status.filter((s) => s.status === 'not-run').length;
      lines.push(`Cohort tables for ${status.length} patient(s) in ${out}: ${files.map((f) => f.name).join(', ')}.`);
      if (notRun) lines.push(`${notRun} patient(s) not run yet (status.csv); run their shares, then --merge-only again.`);
    }
    lines.push(CAUTION, '');
    process.stdout.write(lines.join('\n'));
  },
};

function jobsOption(v: string | undefined): number {
  if (v === undefined) return availableParallelism();
  if (!/^\d+$/.test(v) || Number(v) < 1) throw new UsageError(`--jobs must be a whole number of at least 1, got "${v}"`);
  return Number(v);
}

/** Temporary files of a batch killed while writing: never results, so safe to remove. */
async function removeLeftovers(dir: string): Promise<void> {
  for (const name of await readdir(dir)) if (name.startsWith('.') && name.endsWith('.tmp')) await unlink(join(dir, name)).catch(() => undefined);
}

const clock = (s: number) => (s >= 3600 ? `${Math.floor(s / 3600)} h ${Math.round((s % 3600) / 60)} min` : s >= 60 ? `${Math.floor(s / 60)} min ${Math.round(s % 60)} s` : `${Math.round(s)} s`);

/**
 * Hands the tasks to up to `jobs` worker threads, one patient at a time each, and keeps a progress
 * line on stderr (rewritten in place on a terminal, one line per patient in a log). A worker that
 * dies (out of memory, say) fails only its patient; a fresh one takes the next.
 */
async function runPool(tasks: readonly BatchTask[], jobs: number): Promise<BatchOutcome[]> {
  const outcomes: BatchOutcome[] = [];
  if (tasks.length === 0) return outcomes;
  const started = Date.now();
  const tty = process.stderr.isTTY;
  let next = 0;
  let computedMs = 0;
  let computed = 0;
  const progress = () => {
    const failed = outcomes.filter((o) => o.outcome === 'failed').length;
    const unchanged = outcomes.filter((o) => o.outcome === 'unchanged').length;
    const left = tasks.length - outcomes.length;
    // Time left from the pace of the patients actually computed, shared over the workers.
    const eta = computed > 0 ? clock((computedMs / 1000 / computed) * Math.ceil(left / jobs)) : '…';
    const line = `batch: ${outcomes.length}/${tasks.length} patients, ${outcomes.length - failed - unchanged} done, ${unchanged} unchanged, ${failed} failed, about ${left === 0 ? '0 s' : eta} left`;
    process.stderr.write(tty ? `\r${line}\x1b[K` : `${line}\n`);
  };
  const workerUrl = new URL('../batch-worker.js', import.meta.url);
  await new Promise<void>((done) => {
    let live = 0;
    const start = () => {
      const w = new Worker(workerUrl);
      live++;
      let current: BatchTask | null = null;
      let taskStart = 0;
      const give = () => {
        if (next >= tasks.length) {
          current = null;
          void w.terminate();
          return;
        }
        current = tasks[next++];
        taskStart = Date.now();
        w.postMessage(current);
      };
      w.on('message', (o: BatchOutcome) => {
        outcomes.push(o);
        if (o.outcome !== 'unchanged') {
          computedMs += Date.now() - taskStart;
          computed++;
        }
        progress();
        give();
      });
      const lost = (why: string) => {
        if (!current) return;
        outcomes.push({ manifest: current.manifest, outcome: 'failed', reason: `the worker stopped: ${why}`, sha256: '' });
        current = null;
        progress();
      };
      w.on('error', (e) => lost(e.message));
      w.on('exit', (code) => {
        lost(`exit code ${code}`);
        live--;
        if (next < tasks.length) start();
        else if (live === 0) done();
      });
      give();
    };
    for (let k = 0; k < Math.min(jobs, tasks.length); k++) start();
  });
  if (tty) process.stderr.write('\n');
  process.stderr.write(`batch: ${tasks.length} patients in ${clock((Date.now() - started) / 1000)}\n`);
  return outcomes;
}
