import type { Mat4, Vec3 } from '../geometry/mat4.js';
import { cross, dot, norm, sub } from '../geometry/vec3.js';
import type { DicomFacts, DicomFileInfo, FramePlane } from './parse.js';
import { pixelProblem } from './pixels.js';

/**
 * Slices grouped into stacks (one series UID, one orientation, one image size and pixel spacing), the
 * checks that a stack is one evenly spaced volume, and the rule that picks the visit's scan.
 * Geometry follows the Image Plane module (PS3.3 C.7.6.2.1.1): the centre of pixel (column i, row j) is
 * ImagePositionPatient + i·ΔcolumnSpacing·rowCosines + j·ΔrowSpacing·columnCosines, in LPS mm.
 */

export interface SliceRef {
  fileIndex: number;
  file: DicomFileInfo;
  plane: FramePlane;
  /** Position along the slice normal, mm. */
  along: number;
}

export interface Stack {
  /** The series UID, with ":n" appended when one UID holds several stacks. */
  id: string;
  uid: string;
  facts: DicomFacts;
  rows: number;
  columns: number;
  /** Sorted by position along the normal (never by file name or InstanceNumber). */
  slices: SliceRef[];
  warnings: string[];
}

/** One series as listed by `inspect` and the app's import. */
export interface SeriesEntry {
  id: string;
  uid: string;
  number?: number;
  description?: string;
  modality?: string;
  slices: number;
  dims: [number, number, number];
  taken: boolean;
  /** Why this series was taken, or why not. */
  why: string;
}

export interface StackGeometry {
  /** Voxel (column i, row j, slice k) to world RAS mm, row-major. */
  affine: Mat4;
  warnings: string[];
}

const ORIENTATION_TOLERANCE = 1e-3;
const SPACING_TOLERANCE_MM = 1e-3;

export function stackName(s: { id: string; facts: DicomFacts }): string {
  const num = s.facts.seriesNumber !== undefined ? `${s.facts.seriesNumber} ` : '';
  const desc = s.facts.seriesDescription ? `"${s.facts.seriesDescription}" ` : '';
  return `series ${num}${desc}(${s.id})`.replace(/\s+/g, ' ');
}

function normal(o: readonly number[]): Vec3 {
  return cross([o[0], o[1], o[2]], [o[3], o[4], o[5]]);
}

function close(a: readonly number[] | undefined, b: readonly number[] | undefined, tol: number): boolean {
  if (!a || !b) return a === b;
  return a.every((x, n) => Math.abs(x - b[n]) <= tol);
}

/** Groups every frame of every file with pixel data into stacks. */
export function groupStacks(files: readonly (DicomFileInfo | undefined)[]): Stack[] {
  const byUid = new Map<string, Stack[]>();
  files.forEach((file, fileIndex) => {
    if (!file?.pixel) return;
    const groups = byUid.get(file.facts.seriesUid) ?? [];
    byUid.set(file.facts.seriesUid, groups);
    for (const plane of file.frames) {
      const ref0 = (s: Stack) => s.slices[0].plane;
      let stack = groups.find((s) =>
        s.rows === file.pixel!.rows && s.columns === file.pixel!.columns &&
        close(ref0(s).orientation, plane.orientation, ORIENTATION_TOLERANCE) &&
        close(ref0(s).pixelSpacingMm, plane.pixelSpacingMm, SPACING_TOLERANCE_MM));
      if (!stack) {
        stack = { id: file.facts.seriesUid, uid: file.facts.seriesUid, facts: file.facts, rows: file.pixel.rows, columns: file.pixel.columns, slices: [], warnings: [] };
        groups.push(stack);
      }
      stack.slices.push({ fileIndex, file, plane, along: 0 });
    }
  });
  const stacks: Stack[] = [];
  for (const groups of byUid.values()) {
    if (groups.length > 1) {
      groups.forEach((s, n) => { s.id = `${s.uid}:${n + 1}`; });
      const what = groups.map((s) => `${s.id}: ${s.columns}×${s.rows}, ${s.slices.length} slice(s)`).join('; ');
      for (const s of groups) {
        s.warnings.push(`${stackName({ id: s.uid, facts: s.facts })} holds images of ${groups.length} different orientations, sizes or pixel spacings; they are kept apart as ${what}`);
      }
    }
    for (const s of groups) {
      const o = s.slices[0].plane.orientation;
      if (o) {
        const n = normal(o);
        for (const ref of s.slices) ref.along = ref.plane.positionLps ? dot(ref.plane.positionLps, n) : 0;
      }
      // Ties keep file order, which the checks below report as duplicate positions.
      s.slices.sort((a, b) => a.along - b.along);
      stacks.push(s);
    }
  }
  return stacks;
}

/** Volumetric image storage classes (PS3.4 Annex B): CT, MR, PET and their enhanced forms. */
const VOLUME_CLASSES = new Set([
  '1.2.840.10008.5.1.4.1.1.2', '1.2.840.10008.5.1.4.1.1.2.1', '1.2.840.10008.5.1.4.1.1.2.2',
  '1.2.840.10008.5.1.4.1.1.4', '1.2.840.10008.5.1.4.1.1.4.1', '1.2.840.10008.5.1.4.1.1.4.4',
  '1.2.840.10008.5.1.4.1.1.128', '1.2.840.10008.5.1.4.1.1.128.1', '1.2.840.10008.5.1.4.1.1.130',
]);

const CLASS_NAMES: Record<string, string> = {
  '1.2.840.10008.5.1.4.1.1.7': 'a secondary capture (a picture of a screen or report)',
  '1.2.840.10008.5.1.4.1.1.481.2': 'an RT dose grid',
  '1.2.840.10008.5.1.4.1.1.66.4': 'a segmentation',
  '1.2.840.10008.5.1.4.1.1.1': 'a computed radiograph',
  '1.2.840.10008.5.1.4.1.1.1.1': 'a digital X-ray',
  '1.2.840.10008.5.1.4.1.1.6.1': 'an ultrasound image',
  '1.2.840.10008.5.1.4.1.1.20': 'a nuclear medicine image',
};

const VOLUME_MODALITIES = new Set(['CT', 'MR', 'PT']);

/** Description words that name a scout, localizer or dose screen (common practice across vendors). */
const NOT_A_SCAN = /\b(scout|localizer|localiser|topogram|surview|scanogram|survey|dose (report|info))/i;

const MIN_SLICES = 3;

/** Why a stack can never be the visit's scan, or undefined when it can. */
export function notAScan(s: Stack): string | undefined {
  const f = s.facts;
  const cls = f.sopClassUid;
  if (cls && !VOLUME_CLASSES.has(cls)) {
    const named = CLASS_NAMES[cls] ?? (cls.startsWith('1.2.840.10008.5.1.4.1.1.7') ? CLASS_NAMES['1.2.840.10008.5.1.4.1.1.7'] : undefined);
    return `${named ?? `not a CT, MR or PET image (SOP class ${cls})`}`;
  }
  if (!cls && !VOLUME_MODALITIES.has(f.modality ?? '')) return `modality ${f.modality ?? 'unknown'} is not CT, MR or PET`;
  if (f.imageType.includes('LOCALIZER')) return 'a localizer (ImageType LOCALIZER)';
  if (f.seriesDescription && NOT_A_SCAN.test(f.seriesDescription)) return `a scout, localizer or dose screen by its description`;
  const first = s.slices[0].file;
  const problem = pixelProblem(first);
  if (problem) return `${first.file} ${problem}`;
  const odd = s.slices.find((r) => pixelProblem(r.file));
  if (odd) return `${odd.file.file} ${pixelProblem(odd.file)}`;
  if (s.slices.length < MIN_SLICES) return s.slices.length === 1 ? 'a single image, not a volume' : `only ${s.slices.length} slices`;
  const unplaced = s.slices.find((r) => !r.plane.positionLps || !r.plane.orientation || !r.plane.pixelSpacingMm);
  if (unplaced) {
    return `${unplaced.file.file}${unplaced.file.numberOfFrames > 1 ? ` frame ${unplaced.plane.frame + 1}` : ''} lacks ImagePositionPatient, ImageOrientationPatient or PixelSpacing`;
  }
  return undefined;
}

function sliceName(r: SliceRef): string {
  return r.file.numberOfFrames > 1 ? `${r.file.file} frame ${r.plane.frame + 1}` : r.file.file;
}

const fmt = (x: number) => Number(x.toFixed(3)).toString();

/**
 * The voxel-to-RAS affine of a stack, or the reason it is not one evenly spaced volume: repeated
 * positions, a missing slice, uneven gaps or slices off the line. Gantry tilt (a slice step not along
 * the normal) is kept exactly as a sheared affine, with a warning.
 */
export function stackGeometry(s: Stack): StackGeometry | { problem: string } {
  const name = stackName(s);
  const sl = s.slices;
  const o = sl[0].plane.orientation as readonly number[];
  const [rowSpacing, colSpacing] = sl[0].plane.pixelSpacingMm as readonly [number, number];
  const gaps = sl.slice(1).map((r, n) => r.along - sl[n].along);
  const sorted = [...gaps].sort((a, b) => a - b);
  const median = sorted[Math.floor(sorted.length / 2)];
  const tolerance = Math.max(0.01, 0.02 * median);
  for (let n = 0; n < gaps.length; n++) {
    if (gaps[n] < tolerance) {
      return { problem: `${name}: ${sliceName(sl[n])} and ${sliceName(sl[n + 1])} lie at the same position (${fmt(sl[n].along)} mm along the slice normal); a series with repeated positions (several phases, echoes or a repeat) is not one volume` };
    }
  }
  for (let n = 0; n < gaps.length; n++) {
    if (Math.abs(gaps[n] - median) <= tolerance) continue;
    const ratio = gaps[n] / median;
    const what = Math.abs(ratio - Math.round(ratio)) * median <= tolerance && Math.round(ratio) >= 2
      ? `${Math.round(ratio) - 1} slice(s) missing`
      : 'uneven slice spacing';
    return { problem: `${name}: ${what} between ${sliceName(sl[n])} and ${sliceName(sl[n + 1])} (gap ${fmt(gaps[n])} mm where the others are ${fmt(median)} mm)` };
  }
  const first = sl[0].plane.positionLps as Vec3;
  const last = sl[sl.length - 1].plane.positionLps as Vec3;
  const step = sub(last, first).map((x) => x / (sl.length - 1)) as unknown as Vec3;
  for (let n = 0; n < sl.length; n++) {
    const expected = first.map((x, a) => x + n * step[a]) as unknown as Vec3;
    const off = norm(sub(sl[n].plane.positionLps as Vec3, expected));
    if (off > tolerance) return { problem: `${name}: ${sliceName(sl[n])} lies ${fmt(off)} mm off the line through the other slices` };
  }
  const warnings = [...s.warnings];
  const nrm = normal(o);
  const alongStep = dot(step, nrm);
  const sideways = norm(sub(step, nrm.map((x) => x * alongStep) as unknown as Vec3));
  if (sideways > 1e-3 * Math.abs(alongStep)) {
    const deg = (Math.atan2(sideways, Math.abs(alongStep)) * 180) / Math.PI;
    warnings.push(`${name}: slices are sheared by ${fmt(deg)}° (gantry tilt); the affine keeps each slice at its recorded position, so the grid is not rectangular`);
  }
  // Columns of the LPS affine, then x and y negated for RAS (PS3.3 C.7.6.2.1.1; NIfTI RAS+).
  const ci = [o[0] * colSpacing, o[1] * colSpacing, o[2] * colSpacing];
  const cj = [o[3] * rowSpacing, o[4] * rowSpacing, o[5] * rowSpacing];
  const sign = [-1, -1, 1];
  const affine: number[] = [];
  for (let a = 0; a < 3; a++) affine.push(sign[a] * ci[a], sign[a] * cj[a], sign[a] * step[a], sign[a] * first[a]);
  affine.push(0, 0, 0, 1);
  return { affine, warnings };
}

/**
 * The default choice among stacks that can be a scan: the most slices, then the thinnest slice
 * spacing, then the lowest series number. `wanted` (a series UID, or UID:n) overrides it.
 */
export function chooseStack(stacks: readonly Stack[], wanted?: string): { chosen?: Stack; entries: SeriesEntry[]; why?: string } {
  const reasons = new Map<Stack, string | undefined>(stacks.map((s) => [s, notAScan(s)]));
  const candidates = stacks.filter((s) => reasons.get(s) === undefined);
  const spacing = (s: Stack) => (s.slices.length > 1 ? (s.slices[s.slices.length - 1].along - s.slices[0].along) / (s.slices.length - 1) : Infinity);
  const ranked = [...candidates].sort((a, b) =>
    b.slices.length - a.slices.length || spacing(a) - spacing(b) || (a.facts.seriesNumber ?? Infinity) - (b.facts.seriesNumber ?? Infinity));
  let chosen: Stack | undefined;
  let chosenWhy = '';
  let why: string | undefined;
  if (wanted !== undefined) {
    const matching = stacks.filter((s) => s.id === wanted || s.uid === wanted);
    const usable = ranked.filter((s) => matching.includes(s));
    chosen = usable[0];
    chosenWhy = 'picked by the user';
    if (!chosen) {
      why = matching.length === 0
        ? `no series ${wanted} among the ${stacks.length} found`
        : `${stackName(matching[0])} cannot be the scan: ${reasons.get(matching[0])}`;
    }
  } else {
    chosen = ranked[0];
    chosenWhy = ranked.length > 1
      ? `default rule: the most slices, then the thinnest spacing, then the lowest series number, among ${ranked.length} volumetric series`
      : 'the only volumetric series';
    if (!chosen) why = 'no series here can be the scan';
  }
  const entries = stacks.map((s): SeriesEntry => ({
    id: s.id,
    uid: s.uid,
    number: s.facts.seriesNumber,
    description: s.facts.seriesDescription,
    modality: s.facts.modality,
    slices: s.slices.length,
    dims: [s.columns, s.rows, s.slices.length],
    taken: s === chosen,
    why: s === chosen ? chosenWhy : reasons.get(s) ?? 'another series was taken',
  }));
  return { chosen, entries, why };
}
