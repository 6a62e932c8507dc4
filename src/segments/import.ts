import { badFile } from '../errors.js';
import type { Volume } from '../volume/volume.js';
import { countLabelValues } from './label-counts.js';
import { defaultScheme } from './scheme.js';
import type { SegmentMap, SegmentScheme } from './segment-map.js';

/**
 * Takes a label volume as a visit's segment map. With the `default` scheme, IV counts as split
 * (4 = IVa, 9 = IVb) exactly when value 9 occurs. Values the scheme does not know are reported and
 * read as background. The map keeps its own grid: lookups from other grids go through world mm.
 */
export function importSegmentMap(
  labels: Volume,
  scheme: SegmentScheme | 'default',
  file: string,
  /** The labels' counts when the caller has them already (`countLabelValues`), to spare a pass. */
  counted?: Map<number, number>,
): { map: SegmentMap; unknownLabels: number[]; warnings: string[] } {
  const counts = counted ?? countLabelValues(labels);
  // A value the scheme does not know is read as background with a warning; a non-finite one means
  // the file is not a label map at all.
  for (const value of counts.keys()) {
    if (!Number.isFinite(value)) throw badFile(file, `holds the value ${value}; a segment map must hold whole-number labels from 0 up`);
  }
  const chosen = scheme === 'default' ? defaultScheme(counts.has(9)) : scheme;
  const warnings: string[] = [];
  const unknownLabels: number[] = [];
  let unknownVoxels = 0;
  let segmentVoxels = 0;
  for (const [value, count] of counts) {
    if (chosen.has(value)) segmentVoxels += count;
    else if (value !== 0) {
      unknownLabels.push(value);
      unknownVoxels += count;
    }
  }
  unknownLabels.sort((a, b) => a - b);
  if (segmentVoxels === 0) {
    const found = [...counts.keys()].sort((a, b) => a - b).slice(0, 12).join(', ');
    throw badFile(file, `no voxel carries a segment label of the scheme (values found: ${found || 'none'})`);
  }
  if (unknownLabels.length > 0) {
    const shown = unknownLabels.slice(0, 12).join(', ') + (unknownLabels.length > 12 ? ', …' : '');
    warnings.push(
      `${file}: label value${unknownLabels.length > 1 ? 's' : ''} ${shown} not in the segment scheme; ` +
        `${unknownVoxels} voxel${unknownVoxels === 1 ? '' : 's'} read as background`,
    );
  }
  const present = new Set<string>();
  for (const [value, name] of chosen) if (counts.has(value)) present.add(name);
  if (present.has('IV') && (present.has('IVa') || present.has('IVb'))) {
    warnings.push(`${file}: the map holds both IV and IVa/IVb; segment IV volumes overlap`);
  }
  return { map: { labels, scheme: chosen, labelCounts: counts }, unknownLabels, warnings };
}
