import { badFile } from '../errors.js';
import { invertAffine, transformPoint, type Vec3 } from '../geometry/mat4.js';
import type { VolumeRole } from '../model/records.js';
import { importSegmentMap } from './import.js';
import { countLabelValues } from './label-counts.js';
import type { SegmentScheme } from './segment-map.js';
import { valueAt, type Volume } from '../volume/volume.js';

/**
 * The checks an import makes, in the core once: the app's import and the command line both call
 * them, so neither accepts what the other refuses.
 */

/** A stored volume's grid: enough to place points and boxes in world space without its voxels. */
export interface GridInfo {
  file: string;
  dims: readonly number[];
  affine: readonly number[];
}

/**
 * Labels must be whole numbers from 0 up; the masks a visit cannot do without must not be empty. One
 * count of the label values serves every check, the segment map's own included; the voxels are walked
 * again only to name the first bad one.
 */
export function checkMask(volume: Volume, role: Exclude<VolumeRole, 'scan'>, file: string, scheme: SegmentScheme | 'default'): string[] {
  const counts = countLabelValues(volume);
  const bad = (v: number) => v !== 0 && (!(v > 0) || !Number.isInteger(v));
  if ([...counts.keys()].some(bad)) {
    for (let k = 0; k < volume.data.length; k++) {
      const v = valueAt(volume, k);
      if (bad(v)) throw badFile(file, `holds the value ${v} at voxel ${k}; a ${role} mask must hold whole-number labels from 0 up`);
    }
  }
  const nonzero = volume.data.length - (counts.get(0) ?? 0);
  const warnings: string[] = [];
  if (nonzero === 0) {
    if (role === 'lesions' || role === 'viable') warnings.push(`${file}: the ${role} mask is empty (no ${role === 'lesions' ? 'lesion' : 'viable'} voxels)`);
    else throw badFile(file, `the ${role} mask is empty (no voxel above 0)`);
  }
  if (role === 'segments') warnings.push(...importSegmentMap(volume, scheme, file, counts).warnings);
  return warnings;
}

/** Masks must overlap the scan in world space: a mask that does not belongs to another scan. */
export function checkOverlap(mask: GridInfo, scan: GridInfo): void {
  const a = worldBox(mask);
  const b = worldBox(scan);
  const apart = [0, 1, 2].some((c) => a.max[c] < b.min[c] || b.max[c] < a.min[c]);
  if (apart) {
    throw badFile(
      mask.file,
      `does not overlap the scan ${scan.file} anywhere in world space; is it from another visit, or saved with a different orientation?`,
    );
  }
}

/** Points (landmarks, marks) must lie on the scan's grid, allowing one voxel beyond its edge. */
export function checkPointsOnScan(points: { name: string; at: Vec3 }[], file: string, scan: GridInfo): void {
  const inverse = invertAffine(scan.affine);
  for (const { name, at } of points) {
    const ijk = transformPoint(inverse, at);
    const outside = ijk.some((x, c) => x < -1.5 || x > extent(scan, c) + 0.5);
    if (outside) {
      const shown = at.map((x) => x.toFixed(1)).join(', ');
      throw badFile(
        file,
        `${name} at [${shown}] mm lies outside the scan ${scan.file}; points must be world RAS mm on this visit's scan (LPS points need x and y negated)`,
      );
    }
  }
}

function worldBox(g: GridInfo): { min: number[]; max: number[] } {
  const min = [Infinity, Infinity, Infinity];
  const max = [-Infinity, -Infinity, -Infinity];
  for (let corner = 0; corner < 8; corner++) {
    const edge = (c: number) => ((corner >> c) & 1 ? extent(g, c) - 0.5 : -0.5);
    const ijk: Vec3 = [edge(0), edge(1), edge(2)];
    const p = transformPoint(g.affine, ijk);
    for (let c = 0; c < 3; c++) {
      min[c] = Math.min(min[c], p[c]);
      max[c] = Math.max(max[c], p[c]);
    }
  }
  return { min, max };
}

/** Grid size along axis c; a 2-D image has one slice. */
const extent = (g: GridInfo, c: number) => g.dims[c] ?? 1;

/** Voxel sizes of a CT or MR scan of the abdomen lie well inside this range, mm (common practice). */
export const PLAUSIBLE_SPACING_MM = [0.05, 20] as const;
/** A liver above this volume is implausible (adult livers are about 1–3 L; common practice). */
export const PLAUSIBLE_LIVER_ML = 6000;

/** Voxel sizes must be finite and above zero; outside the plausible range they are warned about. */
export function checkSpacing(volume: Pick<Volume, 'spacingMm'>, file: string): string[] {
  const s = volume.spacingMm;
  if (!s.every((x) => Number.isFinite(x) && x > 0)) {
    throw badFile(file, `has voxel sizes ${s.map(String).join(' × ')} mm; each must be a finite length above 0`);
  }
  const [lo, hi] = PLAUSIBLE_SPACING_MM;
  if (s.some((x) => x < lo || x > hi)) {
    return [`${file}: voxel sizes ${s.map((x) => x.toPrecision(3)).join(' × ')} mm are outside the plausible ${lo}–${hi} mm; check the header's units`];
  }
  return [];
}

/** A liver volume must be finite; above the plausible range it is warned about. */
export function checkLiverVolume(volumeMl: number, file: string): string[] {
  if (!Number.isFinite(volumeMl)) throw badFile(file, `gives a liver volume of ${volumeMl} mL; check the voxel sizes`);
  if (volumeMl > PLAUSIBLE_LIVER_ML) {
    return [`${file}: liver volume ${Math.round(volumeMl)} mL is above the plausible ${PLAUSIBLE_LIVER_ML} mL; check the voxel sizes and units`];
  }
  return [];
}

/** A volume's grid for the overlap and point checks. */
export function gridOf(volume: Pick<Volume, 'dims' | 'affine'>, file: string): GridInfo {
  return { file, dims: volume.dims, affine: volume.affine };
}
