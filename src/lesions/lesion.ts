import type { Vec3 } from '../geometry/mat4.js';

/**
 * One lesion at one visit with its measures (brief, "Measures"). Lengths in mm, volume in mL.
 * A lesion from a manual mark has no voxels: no volume, 3-D diameter or mean value.
 */
export interface Lesion {
  id: string;
  source: 'mask' | 'mark';
  /** Mean of the voxel centres (a mark: its centre), world RAS mm. */
  centroidMm: Vec3;
  volumeMl: number | null;
  /** Longest in-slice distance between voxel centres over all axial slices (RECIST longest diameter). */
  longestAxialMm: number;
  /** Extent perpendicular to the longest diameter, in the same slice. */
  shortAxisMm: number;
  /** Ends of the longest axial diameter, world mm (a mark: its calipers when given). */
  longestAxialEndpointsMm: [Vec3, Vec3] | null;
  /** Largest distance between any two voxel centres. */
  max3dMm: number | null;
  /** Mean scan value (after scaling) over the lesion's voxels. */
  meanValue: number | null;
  voxelCount: number;
}
