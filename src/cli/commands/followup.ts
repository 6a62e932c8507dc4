import { CAUTION } from '../../caution.js';
import { bestResponseText } from '../../followup/best-response.js';
import { showsViable, type FollowupResult, type VisitFollowup } from '../../followup/followup.js';
import { targetSumText } from '../../followup/response.js';
import { maxLesionsOption, parseArgs, UsageError } from '../args.js';
import type { Command } from '../commands.js';
import { followupOfPatient, loadPatient, type LoadedPatient } from '../patient.js';
import { READER_OPTIONS, READER_USAGE, withReaderOptions } from '../reader-options.js';

const USAGE = `falciform followup MANIFEST [--max-lesions N] [--json] ${READER_USAGE}`;

export const followup: Command = {
  summary: "a patient's visits: lesion tracks, response per visit, burden per segment per visit",
  usage: USAGE,
  async run(argv) {
    const args = parseArgs(argv, [...READER_OPTIONS, 'max-lesions'], ['json']);
    if (args.positional.length !== 1) throw new UsageError(args.positional.length === 0 ? 'name the study manifest' : `unexpected argument "${args.positional[1]}"`);
    const manifestFile = args.positional[0];
    const loaded = await loadPatient(manifestFile, { maxLesions: maxLesionsOption(args) });
    const manifest = withReaderOptions(loaded.manifest, args);
    const patient: LoadedPatient = {
      ...loaded,
      manifest,
      visits: loaded.visits.map((v) => ({ ...v, followup: { ...v.followup, readerCalls: manifest.visits.find((m) => m.id === v.manifest.id)?.readerCalls } })),
    };
    const result = followupOfPatient(patient);
    if (args.options.has('json')) process.stdout.write(`${JSON.stringify(forJson(patient, result))}\n`);
    else process.stdout.write(summary(patient, result));
  },
};

/** The followup document of the contracts, its fields first, then the extras. */
function forJson(patient: LoadedPatient, r: FollowupResult) {
  const visitWarnings = patient.visits.flatMap((v) => v.warnings.map((w) => `visit ${v.manifest.id}: ${w}`));
  return {
    visits: r.visits,
    tracks: r.tracks,
    burden: r.burden,
    patient: { id: patient.manifest.patient.id },
    criteria: r.criteria,
    marginMm: r.marginMm,
    targets: r.targets,
    bestResponse: r.bestResponse,
    protocol: r.protocol,
    departures: r.departures,
    scope: r.scope,
    warnings: [...visitWarnings, ...r.warnings],
    notes: r.notes,
    caution: CAUTION,
  };
}

const f1 = (x: number | null | undefined) => (x === null || x === undefined ? '—' : x.toFixed(1));
const pct = (x: number | null) => (x === null ? '—' : `${x > 0 ? '+' : ''}${x.toFixed(1)}%`);
const list = (xs: readonly string[]) => (xs.length ? xs.join(', ') : '—');

/** A readable table per visit for a reader at a terminal. */
function summary(patient: LoadedPatient, r: FollowupResult): string {
  const lines: string[] = [];
  lines.push(
    `Patient ${patient.manifest.patient.id}: ${r.visits.length} visit(s), ${r.criteria}, ` +
      `targets ${list(r.targets.tracks)} (${r.targets.source === 'named' ? 'named in the manifest' : 'default selection'}), margin ${r.marginMm} mm`,
  );
  lines.push(r.scope);
  if (r.departures.length) lines.push(`Protocol settings: ${r.departures.join('; ')}`);
  r.visits.forEach((v, k) => lines.push('', ...visitBlock(r, v, k)));
  lines.push('', `Best overall response: ${bestResponseText(r.bestResponse)}`);
  lines.push('', 'Burden per segment (count / sum of longest axial diameters mm / volume mL):');
  const segments = [...new Set(r.burden.map((b) => b.segment))];
  lines.push(`  ${'visit'.padEnd(10)} ${segments.map((s) => (s ?? 'outside').padStart(16)).join('')}`);
  for (const v of r.visits) {
    const cells = segments.map((s) => {
      const b = r.burden.find((x) => x.visit === v.id && x.segment === s);
      return (b ? `${b.count} / ${f1(b.sumLongestAxialMm)} / ${b.volumeMl === null ? '—' : b.volumeMl.toFixed(1)}` : '').padStart(16);
    });
    lines.push(`  ${v.id.padEnd(10)} ${cells.join('')}`);
  }
  const warnings = [...patient.visits.flatMap((v) => v.warnings.map((w) => `visit ${v.manifest.id}: ${w}`)), ...r.warnings];
  if (warnings.length) lines.push('', ...warnings.map((w) => `warning: ${w}`));
  lines.push('', ...r.notes.map((n) => `note: ${n}`), '', CAUTION, '');
  return lines.join('\n');
}

/** The reader's calls at a visit and what is waiting for one. */
function readerLine(v: VisitFollowup): string {
  const parts = [`reader: non-targets ${v.readerCalls.nonTarget ?? '—'}, outside the liver ${v.readerCalls.outsideLiver}`];
  if (v.equivocalNewLesions.length) parts.push(`equivocal new ${list(v.equivocalNewLesions)} (followed, not PD)`);
  if (v.unconfirmedGone.length) parts.push(`missing, not confirmed gone ${list(v.unconfirmedGone)} (NE)`);
  return parts.join('; ');
}

function visitBlock(r: FollowupResult, v: VisitFollowup, k: number): string[] {
  const resp = v.response;
  const head =
    k === 0
      ? `${v.id}  ${v.date}  baseline  target sum ${f1(resp.targetSumMm)} mm`
      : `${v.id}  ${v.date}  ${v.overall}  (targets ${resp.targetCategory}, non-targets ${resp.nonTargetCategory}${resp.newLesion ? ', new lesion' : ''})  ` +
        `target sum ${targetSumText(resp)}, ${pct(resp.changeFromBaselinePct)} from baseline ${f1(resp.baselineSumMm)}, ` +
        `${pct(resp.changeFromNadirPct)} from nadir ${f1(resp.nadirSumMm)}`;
  const out = [head];
  for (const other of v.otherResponses) {
    out.push(`  ${other.criteria}: ${other.category ?? 'baseline'}, target sum ${f1(other.targetSumMm)} mm, ${pct(other.changeFromBaselinePct)} from baseline`);
  }
  const a = v.alignment;
  if (k > 0) out.push(`  aligned by ${a.method}${a.residualMm === null ? '' : `, residual ${a.residualMm.toFixed(2)} mm`}${a.rotationDeg ? `, rotation ${a.rotationDeg.toFixed(1)}°` : ''}`);
  if (k > 0) out.push(`  new ${list(v.newLesions)}   gone ${list(v.goneLesions)}   not evaluable ${list(v.notEvaluable)}   margin alerts ${list(v.marginAlerts)}`);
  if (k > 0) out.push(`  ${readerLine(v)}`);
  else out.push(`  margin alerts ${list(v.marginAlerts)}`);
  const viable = showsViable(r);
  out.push(`  track  lesion(s)      segment  longest mm${viable ? '  viable mm' : ''}  target  status`);
  for (const t of r.tracks) {
    const status = t.status[v.id];
    if (!status) continue;
    const lesions = t.fragments?.[v.id]?.join('+') ?? t.lesions[v.id] ?? '—';
    const state = status === 'merged' ? `merged into ${t.mergedInto?.[v.id]}` : status;
    out.push(
      `  ${t.id.padEnd(6)} ${lesions.padEnd(14)} ${(t.segments[v.id] ?? (status === 'present' ? 'outside' : '—')).padEnd(8)} ` +
        `${f1(t.longestAxialMm[v.id]).padStart(10)}  ${viable ? `${f1(t.viableAxialMm?.[v.id]).padStart(9)}  ` : ''}${(t.target ? 'yes' : '').padEnd(6)}  ${state}`,
    );
  }
  return out;
}
