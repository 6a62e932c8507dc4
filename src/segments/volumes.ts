import { voxelVolumeMl } from '../volume/volume.js';
import { labelCountsOf } from './label-counts.js';
import { SEGMENT_NAMES, type SegmentMap, type SegmentName } from './segment-map.js';

export { resampleLabels } from './resample.js';

/** Volume of each segment present in the map, mL, in the order I, II, III, IV/IVa, IVb, V … VIII. */
export function segmentVolumes(map: SegmentMap): { segment: SegmentName; volumeMl: number }[] {
  const voxelMl = voxelVolumeMl(map.labels);
  const perSegment = new Map<SegmentName, number>();
  for (const [value, count] of labelCountsOf(map)) {
    const name = map.scheme.get(value);
    if (name !== undefined) perSegment.set(name, (perSegment.get(name) ?? 0) + count);
  }
  return SEGMENT_NAMES.filter((s) => perSegment.has(s)).map((segment) => ({
    segment,
    volumeMl: (perSegment.get(segment) as number) * voxelMl,
  }));
}

/** Liver volume in mL: every voxel that carries a segment of the scheme. */
export function liverVolumeMl(map: SegmentMap): number {
  let voxels = 0;
  for (const [value, count] of labelCountsOf(map)) if (map.scheme.has(value)) voxels += count;
  return voxels * voxelVolumeMl(map.labels);
}
