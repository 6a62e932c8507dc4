import { badInput } from '../errors.js';
import { segmentLookup } from '../lesions/segment-lookup.js';
import { SEGMENT_NAMES, type SegmentMap, type SegmentName } from '../segments/segment-map.js';
import { segmentVolumes } from '../segments/volumes.js';
import { gridToGrid } from '../volume/resample.js';
import { voxelVolumeMl, type Volume } from '../volume/volume.js';

/** A lesion known only by its diameters (a manual mark), placed in a segment. */
export interface TumourDiameters {
  id?: string;
  /** Null for a mark whose centre lies outside the segment map's liver. */
  segment: SegmentName | null;
  longestAxialMm: number;
  shortAxisMm: number;
}

export interface SegmentVolumetry {
  segment: SegmentName;
  volumeMl: number;
  tumourMl: number;
  tumourFreeMl: number;
}

export interface VisitVolumetry {
  /** Sum of the segment volumes, so the segments add up to it exactly. */
  liverVolumeMl: number;
  /** Tumour inside the map's segments. */
  tumourVolumeMl: number;
  tumourFreeLiverMl: number;
  /** Tumour that fell on the map's background or off its grid, kept out of every segment. */
  tumourOutsideSegmentsMl: number;
  tumourFrom: 'lesion mask' | 'diameters' | 'none';
  /** True when tumour volumes are ellipsoid estimates from diameters, not voxel counts. */
  estimated: boolean;
  segments: SegmentVolumetry[];
  notes: string[];
  /**
   * The map was built from a landmark set without a caudate mask: the plane rule then puts the
   * caudate's tissue into the plane segments around it, so segment I is absent but its volume is not.
   */
  caudateInPlaneSegments?: boolean;
}

const ESTIMATE_NOTE =
  'Tumour volumes are ESTIMATES from the marked diameters (ellipsoid π/6 × longest × short axis²), ' +
  'not measured from a lesion mask.';

/**
 * A visit's liver, tumour and tumour-free volumes per segment. Tumour comes from a lesion mask
 * (any grid: each lesion voxel is placed through world coordinates) or, without one, from marked
 * diameters as ellipsoids.
 */
export function visitVolumetry(map: SegmentMap, tumour?: Volume | readonly TumourDiameters[]): VisitVolumetry {
  const volumes = segmentVolumes(map);
  const tumourMl = new Float64Array(SEGMENT_NAMES.length);
  const notes: string[] = [];
  let outsideMl = 0;
  let from: VisitVolumetry['tumourFrom'] = 'none';

  if (tumour !== undefined && isVolume(tumour)) {
    from = 'lesion mask';
    const counts = countMaskPerSegment(map, tumour, tumourMl.length);
    const voxelMl = voxelVolumeMl(tumour);
    for (let s = 0; s < tumourMl.length; s++) tumourMl[s] = counts.perSegment[s] * voxelMl;
    outsideMl = counts.outside * voxelMl;
    if (counts.outside > 0) {
      notes.push(`${counts.outside} lesion-mask voxels (${outsideMl.toFixed(1)} mL) lie outside the segment map's liver and are left out of every segment.`);
    }
  } else if (tumour !== undefined) {
    from = 'diameters';
    notes.push(ESTIMATE_NOTE);
    const present = new Set(volumes.map((v) => v.segment));
    tumour.forEach((t, n) => {
      const ml = ellipsoidMl(t, n);
      if (t.segment !== null && present.has(t.segment)) tumourMl[SEGMENT_NAMES.indexOf(t.segment)] += ml;
      else {
        outsideMl += ml;
        const where = t.segment === null ? 'lies outside the segment map\'s liver' : `segment ${t.segment} is not in this visit's segment map`;
        notes.push(`${t.id ?? `lesion ${n + 1}`}: ${where}; its estimated ${ml.toFixed(1)} mL is left out of every segment.`);
      }
    });
  }

  const segments = volumes.map(({ segment, volumeMl }): SegmentVolumetry => {
    const t = tumourMl[SEGMENT_NAMES.indexOf(segment)];
    if (t > volumeMl) {
      notes.push(`Segment ${segment}: tumour (${t.toFixed(1)} mL) exceeds the segment (${volumeMl.toFixed(1)} mL); its tumour-free volume is taken as 0.`);
    }
    return { segment, volumeMl, tumourMl: t, tumourFreeMl: Math.max(0, volumeMl - t) };
  });
  const sum = (f: (s: SegmentVolumetry) => number) => segments.reduce((a, s) => a + f(s), 0);
  return {
    liverVolumeMl: sum((s) => s.volumeMl),
    tumourVolumeMl: sum((s) => s.tumourMl),
    tumourFreeLiverMl: sum((s) => s.tumourFreeMl),
    tumourOutsideSegmentsMl: outsideMl,
    tumourFrom: from,
    estimated: from === 'diameters',
    segments,
    notes,
  };
}

function isVolume(x: Volume | readonly TumourDiameters[]): x is Volume {
  return !Array.isArray(x);
}

// The marks reader lets a short axis exceed the longest diameter by this much (typed-in rounding);
// the estimate must accept every mark that reader accepts, or one mark would stop a whole load.
const ROUNDING_MM = 0.05;

/** Ellipsoid with axes L, S, S: π/6 · L · S² mm³, in mL. A zero diameter gives 0 mL. */
function ellipsoidMl(t: TumourDiameters, n: number): number {
  const what = t.id ?? `lesion ${n + 1}`;
  const { longestAxialMm: L, shortAxisMm: S } = t;
  if (!(Number.isFinite(L) && L >= 0) || !(Number.isFinite(S) && S >= 0)) {
    throw badInput(what, `diameters must be lengths in mm ≥ 0 (longest ${String(L)}, short axis ${String(S)})`);
  }
  if (S > L + ROUNDING_MM) throw badInput(what, `short axis ${S} mm is longer than the longest diameter ${L} mm`);
  const s = Math.min(S, L);
  return ((Math.PI / 6) * L * s * s) / 1000;
}

/**
 * Lesion voxels (value > 0) counted by the segment of the map voxel nearest their world position.
 * Mask voxel → map voxel is one affine (map inverse × mask affine), so the loop does a few
 * multiply-adds per voxel; rounding to the nearest voxel matches `segmentAtWorld`.
 */
function countMaskPerSegment(map: SegmentMap, mask: Volume, nSlots: number): { perSegment: Float64Array; outside: number } {
  const m = gridToGrid(mask, map.labels);
  const [nx, ny, nz] = mask.dims;
  const [mx, my, mz] = map.labels.dims;
  const { data, slope, inter } = mask;
  // Slots are SEGMENT_NAMES indices, as the lookup gives them.
  const seg = segmentLookup(map);
  const perSegment = new Float64Array(nSlots);
  let outside = 0;
  let n = 0;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const bx = m[1] * j + m[2] * k + m[3];
      const by = m[5] * j + m[6] * k + m[7];
      const bz = m[9] * j + m[10] * k + m[11];
      for (let i = 0; i < nx; i++, n++) {
        if (!(data[n] * slope + inter > 0)) continue; // NaN in a float mask is no lesion
        const a = Math.round(m[0] * i + bx);
        const b = Math.round(m[4] * i + by);
        const c = Math.round(m[8] * i + bz);
        if (a < 0 || b < 0 || c < 0 || a >= mx || b >= my || c >= mz) {
          outside++;
          continue;
        }
        const s = seg(a + mx * (b + my * c));
        if (s < 0) outside++;
        else perSegment[s]++;
      }
    }
  }
  return { perSegment, outside };
}
