import { Dexie, type ObservabilitySet } from 'dexie';
import type { PatientAnalysis } from './types.js';

// Store tables an analysis never reads: a write there leaves every kept analysis valid.
const UNREAD_TABLES = new Set(['audit', 'settings']);

const kept = new Map<string, PatientAnalysis>();
let storeChanges = 0;

/** Whether a write to these parts of the store ("idb://DB/TABLE/INDEX") can change an analysis. */
export function changesAnalysis(parts: ObservabilitySet): boolean {
  return Object.keys(parts).some((part) => {
    const table = /^idb:\/\/[^/]*\/([^/]+)\//.exec(part)?.[1];
    return table === undefined || !UNREAD_TABLES.has(table);
  });
}

// Dexie reports every committed write, in this window and (over a BroadcastChannel) in its workers
// and other windows of the app; any that can change an analysis forgets them all.
Dexie.on('storagemutated', (parts: ObservabilitySet) => {
  if (!changesAnalysis(parts)) return;
  storeChanges++;
  kept.clear();
});

/** Forgets every kept analysis: after a setting an analysis reads (the lesion cap) is changed. */
export function forgetKeptAnalyses(): void {
  storeChanges++;
  kept.clear();
}

/**
 * The patient's analysis computed earlier in this session from the store as it still is, or null.
 * Reopening a patient then draws at once instead of reading and analysing every visit again.
 */
export function keptAnalysis(patientId: string): PatientAnalysis | null {
  return kept.get(patientId) ?? null;
}

/**
 * Call as an analysis starts; hand its result to the returned function. The result is kept only if
 * nothing an analysis reads was written meanwhile, so it never outlives an edit made during the run.
 */
export function keepAnalysisOf(patientId: string): (result: PatientAnalysis) => void {
  const at = storeChanges;
  return (result) => {
    if (at === storeChanges) kept.set(patientId, result);
  };
}
