import { badFile, isFalciformError } from '../errors.js';
import { describeLiver, type LiverShape } from '../followup/liver-shape.js';
import { runFollowup, type FollowupResult, type FollowupVisit } from '../followup/followup.js';
import type { ViableComponent } from '../followup/mrecist.js';
import type { ResponseProtocol } from '../followup/protocol.js';
import type { Override } from '../followup/tracks.js';
import { lesionsFromMask } from '../lesions/components.js';
import { parseMarks } from '../lesions/marks.js';
import { longestInsideAxial } from '../lesions/inside-diameter.js';
import { measureMaskLesion } from '../lesions/measures.js';
import type { Manifest, ManifestVisit } from '../manifest/manifest.js';
import { visitVolumetry, type VisitVolumetry } from '../remnant/volumetry.js';
import { renderKeyImage, type KeyImage } from '../report/key-image.js';
import type { SegmentMap } from '../segments/segment-map.js';
import { analyzeVisit, type VisitAnalysis } from '../visit/analyze.js';
import type { LoadedNifti } from '../volume/nifti-read.js';
import { axialAxis, type Volume } from '../volume/volume.js';
import { visitSegmentMap } from './visit-map.js';

/**
 * Reads every file a patient's study manifest names, and analyses each visit as `falciform analyze`
 * would, with the manifest's margin. Files come through a `PatientFiles` source: the file system for
 * the command line, the local store for the app, so both give the same numbers. Visits are read one at a time and only what follow-up needs is kept
 * (the analysis, the landmark set, the liver's shape), so a long series does not hold every scan in
 * memory. Any bad file stops the load with an error naming that file.
 */
export interface LoadedVisit {
  manifest: ManifestVisit;
  analysis: VisitAnalysis;
  /** The visit as runFollowup takes it. */
  followup: FollowupVisit;
  /** Liver, tumour and tumour-free volume per segment: tumour from the lesion mask, else estimated from the marks. */
  volumetry: VisitVolumetry;
  /** Files and reading warnings, analysis warnings included. */
  warnings: string[];
  /** The files read, by role (scan, segments, liver, …), as resolved against the manifest. */
  files: Record<string, string>;
  /** The visit's segment map, only when asked for with keepSegmentMaps. */
  segmentMap?: SegmentMap;
  /** Each lesion's key image by lesion id, only when asked for with keyImages. */
  keyImages?: Record<string, KeyImage>;
}

export interface LoadedPatient {
  manifest: Manifest;
  manifestFile: string;
  visits: LoadedVisit[];
}

/** Where a manifest's files come from; paths are as written in the manifest. */
export interface PatientFiles {
  /** The name to show in messages for a manifest path (a file path, or the imported file's name). */
  name(path: string): string;
  volume(path: string): Promise<Pick<LoadedNifti, 'volume' | 'warnings'>>;
  text(path: string): Promise<string>;
}

export interface LoadOptions {
  /** Keep each visit's segment map (large: one byte per voxel). */
  keepSegmentMaps?: boolean;
  /** Lesions per visit above which a mask is refused (default DEFAULT_MAX_LESIONS). */
  maxLesions?: number;
  /** Draw each lesion's key image while the scan, map and mask are in hand (thumbnails, for the board page). */
  keyImages?: boolean;
}

export async function loadPatientFrom(
  manifest: Manifest,
  manifestFile: string,
  source: PatientFiles,
  opts: LoadOptions = {},
): Promise<LoadedPatient> {
  const visits: LoadedVisit[] = [];
  for (const v of manifest.visits) visits.push(await loadVisit(manifestFile, manifest, v, source, opts));
  return { manifest, manifestFile, visits };
}

async function loadVisit(
  manifestPath: string,
  manifest: Manifest,
  v: ManifestVisit,
  source: PatientFiles,
  opts: LoadOptions,
): Promise<LoadedVisit> {
  const path = (rel: string) => source.name(rel);
  const files: Record<string, string> = {};
  const warnings: string[] = [];
  const volume = async (role: string, rel: string): Promise<Volume> => {
    files[role] = path(rel);
    const loaded = await source.volume(rel);
    warnings.push(...loaded.warnings);
    return loaded.volume;
  };
  const text = async (role: string, rel: string): Promise<string> => {
    files[role] = path(rel);
    return source.text(rel);
  };

  const scan = await volume('scan', v.scan);
  const axis = axialAxis(scan.affine);
  const sliceThicknessMm = scan.spacingMm[axis];

  const visitMap = await visitSegmentMap(v, { volume, text, name: path }, scan);
  warnings.push(...visitMap.warnings);
  const segments = visitMap.map;
  const landmarks = visitMap.landmarks;
  // An imported map's labelled voxels are all liver: its own outline serves for alignment.
  const liver: LiverShape | null = describeLiver(visitMap.liver);
  if (liver === null) throw badFile(files.segments ?? files.liver ?? files.scan, 'holds no liver voxels');

  const lesionMask = v.lesions !== undefined ? await volume('lesions', v.lesions) : undefined;
  const marks = v.marks !== undefined ? parseMarks(await text('marks', v.marks), path(v.marks)) : undefined;
  let analysis: VisitAnalysis;
  let volumetry: VisitVolumetry;
  try {
    analysis = analyzeVisit({ scan, segments, lesionMask, marks, marginMm: manifest.marginMm, lesionFile: files.lesions, scanFile: files.scan, segmentsFile: files.segments ?? files.liver, maxLesions: opts.maxLesions });
    // Here the segment map and lesion mask are still in hand; later steps keep only plain results.
    volumetry = visitVolumetry(segments, lesionMask ?? (marks && analysis.lesions.filter((l) => l.source === 'mark')));
    if (visitMap.source === 'built' && v.caudate === undefined) volumetry = { ...volumetry, caudateInPlaneSegments: true };
  } catch (e) {
    // The analysis names inputs by role; the shells need the file.
    if (isFalciformError(e) && e.kind === 'bad-input') throw badFile(files.marks ?? files.lesions ?? manifestPath, `visit ${v.id}: ${e.problem}`);
    throw e;
  }
  warnings.push(...analysis.warnings);

  let viable: { components: ViableComponent[] } | undefined;
  if (v.viable !== undefined) {
    const mask = await volume('viable', v.viable);
    const found = lesionsFromMask(mask, files.viable, opts.maxLesions);
    viable = {
      components: found.lesions.map((lv, n) => {
        const m = measureMaskLesion(`V${n + 1}`, mask, lv, null);
        return { centroidMm: m.centroidMm, viableAxialMm: longestInsideAxial(mask, lv, files.viable).lengthMm };
      }),
    };
  }

  const followup: FollowupVisit = {
    id: v.id,
    date: v.date,
    lesions: analysis.lesions,
    landmarks,
    liver,
    sliceThicknessMm,
    viable,
    ...(v.readerCalls ? { readerCalls: v.readerCalls } : {}),
  };
  const keyImages = opts.keyImages
    ? Object.fromEntries(analysis.lesions.map((l) => [l.id, renderKeyImage(scan, segments, lesionMask, l)]))
    : undefined;
  return {
    manifest: v, analysis, volumetry, followup, warnings, files,
    ...(opts.keepSegmentMaps ? { segmentMap: segments } : {}),
    ...(keyImages ? { keyImages } : {}),
  };
}

/**
 * runFollowup with the manifest's targets, margin and criteria, and a reader's corrections of the
 * matching when there are any; a bad target names the manifest.
 */
export function followupOfPatient(patient: LoadedPatient, overrides: readonly Override[] = []): FollowupResult {
  const m = patient.manifest;
  try {
    return runFollowup(
      patient.visits.map((v) => v.followup),
      { targets: m.targets, overrides, marginMm: m.marginMm, criteria: m.criteria, protocol: protocolSettings(m.protocol) },
    );
  } catch (e) {
    if (isFalciformError(e) && e.kind === 'bad-input') throw badFile(patient.manifestFile, `field ${e.file}: ${e.problem}`);
    throw e;
  }
}

/** The manifest's protocol settings as runFollowup takes them (an absent field keeps its default). */
function protocolSettings(p: Manifest['protocol']): Partial<ResponseProtocol> | undefined {
  if (!p) return undefined;
  return Object.fromEntries(Object.entries(p).filter(([, v]) => v !== undefined)) as Partial<ResponseProtocol>;
}
