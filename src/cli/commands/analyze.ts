import { CAUTION } from '../../caution.js';
import type { Vec3 } from '../../geometry/mat4.js';
import { parseMarks } from '../../lesions/marks.js';
import { roundTo } from '../../rounding.js';
import { visitSegmentMap } from '../../patient/visit-map.js';
import type { SegmentMap } from '../../segments/segment-map.js';
import { addMeanValues, analyzeVisitLabels, DEFAULT_MARGIN_MM, type LabelAnalysis, type LesionResult, type VisitAnalysis } from '../../visit/analyze.js';
import { gridOfHeader, type NiftiInfo } from '../../volume/nifti-read.js';
import type { Volume, VolumeGrid } from '../../volume/volume.js';
import { maxLesionsOption, numberOption, optionalOption, parseArgs, requireOption, UsageError } from '../args.js';
import type { Command } from '../commands.js';
import { loadVolume, readTextFile } from '../node-io.js';

const USAGE =
  'falciform analyze --scan FILE (--segments FILE [--scheme FILE] | --liver FILE --landmarks FILE) ' +
  '(--lesions FILE and/or --marks FILE) [--margin-mm N] [--max-lesions N] [--json]';

export const analyze: Command = {
  summary: 'one visit: segment volumes, lesions, their measures, segments and margin alerts',
  usage: USAGE,
  async run(argv) {
    const args = parseArgs(argv, ['scan', 'segments', 'scheme', 'liver', 'landmarks', 'lesions', 'marks', 'margin-mm', 'max-lesions'], ['json']);
    if (args.positional.length > 0) throw new UsageError(`unexpected argument "${args.positional[0]}"`);
    const scanFile = requireOption(args, 'scan');
    const segmentsFile = optionalOption(args, 'segments');
    const schemeFile = optionalOption(args, 'scheme');
    const liverFile = optionalOption(args, 'liver');
    const landmarksFile = optionalOption(args, 'landmarks');
    const lesionsFile = optionalOption(args, 'lesions');
    const marksFile = optionalOption(args, 'marks');
    if ((segmentsFile === undefined) === (liverFile === undefined)) throw new UsageError('give either --segments or --liver with --landmarks');
    if (segmentsFile === undefined && schemeFile !== undefined) throw new UsageError('--scheme goes with --segments');
    if (liverFile !== undefined && landmarksFile === undefined) throw new UsageError('--liver needs --landmarks');
    if (segmentsFile !== undefined && landmarksFile !== undefined) throw new UsageError('--landmarks goes with --liver, not --segments');
    if (lesionsFile === undefined && marksFile === undefined) throw new UsageError('give --lesions (a lesion mask), --marks (a marks file) or both');
    const marginMm = numberOption(args, 'margin-mm', DEFAULT_MARGIN_MM);

    const warnings: string[] = [];
    // The scan's voxels are needed only for the lesions' mean values, so the scan inflates on the
    // thread pool while the label volumes are read and analysed on its grid; its voxels are read
    // last, in one pass. A scan refused by its header is still reported before anything else.
    let headerRead: (info: NiftiInfo) => void = () => undefined;
    const scanHeader = new Promise<NiftiInfo>((resolve) => { headerRead = resolve; });
    const scanLoading = loadVolume(scanFile, { onHeader: (info) => headerRead(info) });
    // Awaited below; a label file's error may come first and must not leave this one unhandled.
    scanLoading.catch(() => undefined);
    const scanGrid = gridOfHeader(await Promise.race([scanHeader, scanLoading.then((l) => l.info)]));
    const labels = await analyzeLabels(scanGrid, { scanFile, segmentsFile, schemeFile, liverFile, landmarksFile, lesionsFile, marksFile, marginMm, maxLesions: maxLesionsOption(args) });
    const scan = keep(await scanLoading, warnings);
    warnings.push(...labels.warnings);
    const analysis = addMeanValues(labels.analysis, scan);
    analysis.warnings.unshift(...warnings);
    if (args.options.has('json')) process.stdout.write(`${JSON.stringify(forJson(analysis))}\n`);
    else process.stdout.write(summary(analysis, marginMm));
  },
};

interface VisitFiles {
  scanFile: string; segmentsFile?: string; schemeFile?: string; liverFile?: string; landmarksFile?: string;
  lesionsFile?: string; marksFile?: string; marginMm: number; maxLesions?: number;
}

/**
 * Reads the label files and analyses them on the scan's grid. The label volumes stay inside this
 * function, so they can be let go while the scan is still inflating.
 */
async function analyzeLabels(scanGrid: VolumeGrid, f: VisitFiles): Promise<{ analysis: LabelAnalysis; warnings: string[] }> {
  const [mapLoaded, maskLoaded, marksText] = await Promise.all([
    visitMap(f.segmentsFile, f.schemeFile, f.liverFile, f.landmarksFile),
    f.lesionsFile !== undefined ? loadVolume(f.lesionsFile) : undefined,
    f.marksFile !== undefined ? readTextFile(f.marksFile) : undefined,
  ]);
  const marks = marksText !== undefined ? parseMarks(marksText, f.marksFile as string) : undefined;
  const analysis = analyzeVisitLabels({
    scan: scanGrid, segments: mapLoaded.map, lesionMask: maskLoaded?.volume, marks, marginMm: f.marginMm, lesionFile: f.lesionsFile,
    scanFile: f.scanFile, segmentsFile: f.segmentsFile ?? f.liverFile, maxLesions: f.maxLesions,
  });
  return { analysis, warnings: [...mapLoaded.warnings, ...(maskLoaded?.warnings ?? [])] };
}

function keep(loaded: { volume: Volume; warnings: string[] }, warnings: string[]): Volume {
  warnings.push(...loaded.warnings);
  return loaded.volume;
}

/** The map as a manifest visit would give it, read from the files named on the command line. */
async function visitMap(segmentsFile: string | undefined, schemeFile: string | undefined, liverFile: string | undefined,
  landmarksFile: string | undefined): Promise<{ map: SegmentMap; warnings: string[] }> {
  const warnings: string[] = [];
  const visit = { segments: segmentsFile, scheme: schemeFile, liver: liverFile, landmarks: landmarksFile };
  const { map, warnings: mapWarnings } = await visitSegmentMap(visit, {
    volume: async (_role, path) => keep(await loadVolume(path), warnings),
    text: (_role, path) => readTextFile(path),
    name: (path) => path,
  });
  return { map, warnings: [...warnings, ...mapWarnings] };
}

// Printed precision: well below what a scan resolves, well above float noise.
const mm = (x: number) => roundTo(x, 2);
const ml = (x: number) => roundTo(x, 3);
const point = (p: Vec3) => [mm(p[0]), mm(p[1]), mm(p[2])];

/** The analyze document of the contracts: its fields first, in its order, then the extras. */
function forJson(a: VisitAnalysis) {
  return {
    segments: a.segments.map((s) => ({ segment: s.segment, volumeMl: ml(s.volumeMl) })),
    liverVolumeMl: ml(a.liverVolumeMl),
    lesions: a.lesions.map(lesionJson),
    warnings: a.warnings,
    // Travels with the numbers, as in `followup --json`.
    caution: CAUTION,
  };
}

function lesionJson(l: LesionResult) {
  const fractions: Record<string, number> = {};
  for (const [s, f] of Object.entries(l.segmentFractions)) fractions[s] = roundTo(f as number, 4);
  return {
    id: l.id,
    centroidMm: point(l.centroidMm),
    segment: l.segment,
    segmentFractions: fractions,
    volumeMl: l.volumeMl === null ? null : ml(l.volumeMl),
    longestAxialMm: mm(l.longestAxialMm),
    shortAxisMm: mm(l.shortAxisMm),
    marginMm: l.marginMm === null ? null : mm(l.marginMm),
    nearestOtherSegment: l.nearestOtherSegment,
    marginAlert: l.marginAlert,
    source: l.source,
    max3dMm: l.max3dMm === null ? null : mm(l.max3dMm),
    meanValue: l.meanValue === null ? null : roundTo(l.meanValue, 2),
    longestAxialEndpointsMm: l.longestAxialEndpointsMm === null ? null : l.longestAxialEndpointsMm.map(point),
    voxelCount: l.voxelCount,
    segmentWarning: l.segmentWarning,
    ...(l.viableAxialMm !== undefined ? { viableAxialMm: mm(l.viableAxialMm) } : {}),
  };
}

/** A plain-text summary for a reader at a terminal. */
function summary(a: VisitAnalysis, marginMm: number): string {
  const f1 = (x: number | null) => (x === null ? '—' : x.toFixed(1));
  const lines = [`Liver ${f1(a.liverVolumeMl)} mL: ${a.segments.map((s) => `${s.segment} ${f1(s.volumeMl)}`).join(', ')} mL`, ''];
  lines.push(`Lesions (margin alert below ${marginMm} mm):`);
  lines.push('  id      segment  longest mm  short mm  volume mL  margin mm  nearest  alert');
  for (const l of a.lesions) {
    lines.push(
      `  ${l.id.padEnd(7)} ${(l.segment ?? 'outside').padEnd(8)} ${f1(l.longestAxialMm).padStart(10)} ${f1(l.shortAxisMm).padStart(9)} ` +
        `${(l.volumeMl === null ? '—' : l.volumeMl.toFixed(2)).padStart(10)} ${f1(l.marginMm).padStart(10)}  ${(l.nearestOtherSegment ?? '—').padEnd(7)}  ${l.marginAlert ? 'ALERT' : ''}`,
    );
  }
  if (a.lesions.length === 0) lines.push('  (none)');
  for (const w of a.warnings) lines.push(`warning: ${w}`);
  lines.push('', CAUTION, '');
  return lines.join('\n');
}
