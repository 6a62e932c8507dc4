import type { Vec3 } from '../geometry/mat4.js';
import { voxelIndexAtWorld, type Volume } from '../volume/volume.js';

/** Couinaud segment names (trade terms). IV is either whole or split into IVa (above) and IVb (below). */
export const SEGMENT_NAMES = ['I', 'II', 'III', 'IV', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII'] as const;
export type SegmentName = (typeof SEGMENT_NAMES)[number];
/** The eight segments with IV whole, as a resection or the default scheme's values 1–8 name them. */
export const WHOLE_SEGMENTS = ['I', 'II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII'] as const;
export type WholeSegment = (typeof WHOLE_SEGMENTS)[number];

/** Which label value means which segment; any value not listed is background. */
export type SegmentScheme = ReadonlyMap<number, SegmentName>;

/** A visit's label volume with the scheme that names its values. */
export interface SegmentMap {
  readonly labels: Volume;
  readonly scheme: SegmentScheme;
  /**
   * Voxels per label value as `countLabelValues` gives them, when whoever made the map counted them
   * already: the volumes then need no second pass over a map of tens of millions of voxels.
   */
  readonly labelCounts?: ReadonlyMap<number, number>;
}

export function isSegmentName(s: string): s is SegmentName {
  return (SEGMENT_NAMES as readonly string[]).includes(s);
}

/** Segment at a world point (nearest voxel of the map's own grid), or null for background/outside. */
export function segmentAtWorld(map: SegmentMap, p: Vec3): SegmentName | null {
  const n = voxelIndexAtWorld(map.labels, p);
  if (n < 0) return null;
  return map.scheme.get(map.labels.data[n] * map.labels.slope + map.labels.inter) ?? null;
}
