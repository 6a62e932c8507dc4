import { describe, expect, it } from 'vitest';
import { burdenBySegment } from '../../src/followup/burden.js';

describe('burden per segment per visit', () => {
  it('counts, sums diameters and volumes per segment, with zero rows so charts have no gaps', () => {
    const rows = burdenBySegment([
      { id: 'v1', lesions: [{ segment: 'VII', longestAxialMm: 21.5, volumeMl: 3.1 }, { segment: 'II', longestAxialMm: 11.7, volumeMl: 0.6 }, { segment: 'VII', longestAxialMm: 8.04, volumeMl: 0.2 }] },
      { id: 'v2', lesions: [{ segment: 'II', longestAxialMm: 14, volumeMl: 1 }, { segment: null, longestAxialMm: 6, volumeMl: 0.1 }] },
    ]);
    // Couinaud order (II before VII), lesions outside every segment last.
    expect(rows).toEqual([
      { visit: 'v1', segment: 'II', count: 1, sumLongestAxialMm: 11.7, volumeMl: 0.6 },
      { visit: 'v1', segment: 'VII', count: 2, sumLongestAxialMm: 29.5, volumeMl: 3.3 },
      { visit: 'v1', segment: null, count: 0, sumLongestAxialMm: 0, volumeMl: 0 },
      { visit: 'v2', segment: 'II', count: 1, sumLongestAxialMm: 14, volumeMl: 1 },
      { visit: 'v2', segment: 'VII', count: 0, sumLongestAxialMm: 0, volumeMl: 0 },
      { visit: 'v2', segment: null, count: 1, sumLongestAxialMm: 6, volumeMl: 0.1 },
    ]);
  });

  it('shares a crossing lesion\'s volume by its segment fractions, as the volumetry counts its voxels', () => {
    // 4 mL lesion centred in V with 0.75 of its voxels in V and 0.25 in VIII: V holds 3 mL, VIII 1 mL;
    // count and diameters stay with the centroid's segment.
    const rows = burdenBySegment([{ id: 'v1', lesions: [{ segment: 'V', longestAxialMm: 20, volumeMl: 4, segmentFractions: { V: 0.75, VIII: 0.25 } }] }]);
    expect(rows).toEqual([
      { visit: 'v1', segment: 'V', count: 1, sumLongestAxialMm: 20, volumeMl: 3 },
      { visit: 'v1', segment: 'VIII', count: 0, sumLongestAxialMm: 0, volumeMl: 1 },
    ]);
  });

  it('gives no volume where a manual mark (no voxels) contributes', () => {
    const rows = burdenBySegment([{ id: 'v1', lesions: [{ segment: 'V', longestAxialMm: 20, volumeMl: null }, { segment: 'V', longestAxialMm: 10, volumeMl: 2 }] }]);
    expect(rows).toEqual([{ visit: 'v1', segment: 'V', count: 2, sumLongestAxialMm: 30, volumeMl: null }]);
  });
});
