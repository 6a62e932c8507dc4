/**
 * One batch worker thread: takes a patient at a time from the batch command, analyses it unless its
 * stored result is finished and its inputs unchanged, and writes the patient's result file whole
 * (temporary file, then rename), so a batch killed at any moment leaves only finished results.
 */
import { readFile } from 'node:fs/promises';
import { parentPort } from 'node:worker_threads';
import { donePatientResult, failedPatientResult, parsePatientResult, type PatientResult } from '../cohort/result.js';
import { isFalciformError } from '../errors.js';
import { utf8 } from '../report/csv.js';
import { reportVisit } from '../report/input.js';
import { patientInputs } from './cohort-files.js';
import { writeFileAtomic } from './node-io.js';
import { diskFiles, followupOfPatient } from './patient.js';
import { loadPatientFrom } from '../patient/load.js';

export interface BatchTask {
  manifest: string;
  manifestPath: string;
  resultPath: string;
}

export interface BatchOutcome {
  manifest: string;
  outcome: 'done' | 'failed' | 'unchanged';
  reason: string;
  sha256: string;
}

async function previous(path: string): Promise<PatientResult | null> {
  try {
    return parsePatientResult(await readFile(path, 'utf8'));
  } catch {
    return null;
  }
}

async function handle(task: BatchTask): Promise<BatchOutcome> {
  const inputs = await patientInputs(task.manifestPath);
  const prev = await previous(task.resultPath);
  const save = (r: PatientResult) => writeFileAtomic(task.resultPath, utf8(`${JSON.stringify(r)}\n`));
  if (prev && prev.status === 'done' && prev.manifest === task.manifest && prev.inputsSha256 === inputs.sha256) {
    if (prev.lastRun !== 'unchanged') await save({ ...prev, lastRun: 'unchanged' });
    return { manifest: task.manifest, outcome: 'unchanged', reason: '', sha256: inputs.sha256 };
  }
  let result: PatientResult;
  if (!inputs.manifest) {
    result = failedPatientResult(task.manifest, inputs.sha256, null, inputs.problem ?? 'the manifest cannot be used');
  } else {
    const manifest = inputs.manifest;
    try {
      const patient = await loadPatientFrom(manifest, task.manifestPath, diskFiles(task.manifestPath));
      const followup = followupOfPatient(patient);
      const visits = patient.visits.map(reportVisit);
      result = donePatientResult(task.manifest, inputs.sha256, { manifest, visits, followup });
    } catch (e) {
      // One patient's bad input (or a fault in its analysis) is recorded and the batch goes on.
      const reason = isFalciformError(e) ? e.message : `internal error: ${e instanceof Error ? e.message : String(e)}`;
      result = failedPatientResult(task.manifest, inputs.sha256, manifest.patient.id, reason);
    }
  }
  await save(result);
  return { manifest: task.manifest, outcome: result.status, reason: result.reason, sha256: inputs.sha256 };
}

parentPort?.on('message', (task: BatchTask) => {
  handle(task).then(
    (outcome) => parentPort?.postMessage(outcome),
    (e: unknown) =>
      parentPort?.postMessage({
        manifest: task.manifest, outcome: 'failed', sha256: '',
        reason: isFalciformError(e) ? e.message : `internal error: ${e instanceof Error ? e.message : String(e)}`,
      } satisfies BatchOutcome),
  );
});
