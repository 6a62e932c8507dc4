import type { Vec3 } from '../geometry/mat4.js';
import { SEGMENT_NAMES, type SegmentMap, type SegmentName } from '../segments/segment-map.js';
import { gridToGrid, sameGrid } from '../volume/resample.js';
import { voxelIndexAtWorld, type Volume } from '../volume/volume.js';
import { nearestVoxelInBall } from './nearest-voxel.js';
import { BACKGROUND, segmentLookup, segmentName, type SegmentIndex } from './segment-lookup.js';

/** A centroid on background is placed in the nearest segment up to this far away (brief, "Measures"). */
export const FALLBACK_RADIUS_MM = 5;

export type SegmentFractions = Partial<Record<SegmentName, number>>;

export interface Placement {
  /** Segment of the centroid (or of the nearest segment voxel within 5 mm); null: outside. */
  segment: SegmentName | null;
  /** Share of the lesion's voxels in each segment (background left out, so the sum may be below 1). */
  fractions: SegmentFractions;
  /** Segments other than `segment` that hold lesion voxels, most voxels first. */
  otherSegments: SegmentName[];
  /** Set when the centroid did not fall on a segment. */
  warning: string | null;
}

/** Segment at a world point by the brief's rule, with the fallback and its warning. */
function segmentOfPoint(
  map: SegmentMap,
  p: Vec3,
  who: string,
  what = 'centroid',
): { index: SegmentIndex; warning: string | null } {
  const seg = segmentLookup(map);
  const n = voxelIndexAtWorld(map.labels, p);
  const here = n < 0 ? BACKGROUND : seg(n);
  if (here !== BACKGROUND) return { index: here, warning: null };
  const near = nearestVoxelInBall(map.labels, p, FALLBACK_RADIUS_MM, (m) => seg(m) !== BACKGROUND);
  const where = n < 0 ? 'lies outside the segment map' : 'falls on background of the segment map';
  if (near) {
    const index = seg(near.index);
    return {
      index,
      warning: `${who}: ${what} ${where}; placed in segment ${SEGMENT_NAMES[index]}, the nearest segment (${near.distanceMm.toFixed(1)} mm away)`,
    };
  }
  return { index: BACKGROUND, warning: `${who}: ${what} ${where} with no segment within ${FALLBACK_RADIUS_MM} mm; left outside the segments` };
}

/** Placement of a lesion from a mask: the centroid's segment and the segments of all its voxels. */
export function placeMaskLesion(id: string, mask: Volume, voxels: Uint32Array, centroidMm: Vec3, map: SegmentMap): Placement {
  const { index, warning } = segmentOfPoint(map, centroidMm, id);
  const counts = voxelSegmentCounts(mask, voxels, map);
  const fractions: SegmentFractions = {};
  const others: SegmentIndex[] = [];
  for (let s = 0; s < counts.length; s++) {
    if (counts[s] === 0) continue;
    fractions[SEGMENT_NAMES[s]] = counts[s] / voxels.length;
    if (s !== index) others.push(s);
  }
  others.sort((a, b) => counts[b] - counts[a] || a - b);
  return { segment: segmentName(index), fractions, otherSegments: others.map((s) => SEGMENT_NAMES[s]), warning };
}

/** Placement of a mark: its centre's segment, which holds the whole mark. */
export function placePoint(id: string, p: Vec3, map: SegmentMap): Placement {
  const { index, warning } = segmentOfPoint(map, p, id, 'centre');
  const segment = segmentName(index);
  return { segment, fractions: segment ? { [segment]: 1 } : {}, otherSegments: [], warning };
}

/** Lesion voxels per segment index; each voxel reads the map voxel nearest to its centre. */
function voxelSegmentCounts(mask: Volume, voxels: Uint32Array, map: SegmentMap): Float64Array {
  const seg = segmentLookup(map);
  const counts = new Float64Array(SEGMENT_NAMES.length);
  if (sameGrid(mask, map.labels)) {
    for (let t = 0; t < voxels.length; t++) {
      const s = seg(voxels[t]);
      if (s >= 0) counts[s]++;
    }
    return counts;
  }
  const M = gridToGrid(mask, map.labels);
  const [nx, ny] = mask.dims;
  const [mx, my, mz] = map.labels.dims;
  for (let t = 0; t < voxels.length; t++) {
    const n = voxels[t];
    const i = n % nx;
    const j = ((n - i) / nx) % ny;
    const k = (n - i - nx * j) / (nx * ny);
    const a = Math.round(M[0] * i + M[1] * j + M[2] * k + M[3]);
    const b = Math.round(M[4] * i + M[5] * j + M[6] * k + M[7]);
    const c = Math.round(M[8] * i + M[9] * j + M[10] * k + M[11]);
    if (a < 0 || b < 0 || c < 0 || a >= mx || b >= my || c >= mz) continue;
    const s = seg(a + mx * (b + my * c));
    if (s >= 0) counts[s]++;
  }
  return counts;
}
