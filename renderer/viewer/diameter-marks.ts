import type { Vec3 } from '../../src/geometry/mat4';
import type { Lesion } from '../../src/lesions/lesion';
import type { Mark } from '../../src/lesions/marks';

/**
 * Mask lesions' measured diameters as read-only calipers for the slice viewer: the longest axial
 * diameter between its two voxel centres, and the short axis across its middle, on the slice where
 * it was measured, labelled with the lesion's id and length so a reader can check them. The id
 * carries the length after a space; `lesionOfDiameter` gives the lesion id back.
 */
export function diameterMarks(lesions: readonly Lesion[]): Mark[] {
  return lesions.flatMap((l) => {
    const ends = l.longestAxialEndpointsMm;
    if (l.source !== 'mask' || !ends) return [];
    const centre = [0, 1, 2].map((c) => (ends[0][c] + ends[1][c]) / 2) as unknown as Vec3;
    return [{ id: `${l.id} ${l.longestAxialMm.toFixed(1)} mm`, centreMm: centre, longestAxialMm: l.longestAxialMm, shortAxisMm: l.shortAxisMm, endpointsMm: ends }];
  });
}

export function lesionOfDiameter(id: string | null): string | null {
  return id === null ? null : id.split(' ')[0];
}
