import { transformPoint, type Mat4, type Vec3 } from '../../src/geometry/mat4.js';
import { axialAxis } from '../../src/volume/volume.js';

export type Plane = 'axial' | 'coronal' | 'sagittal';
export const PLANES: readonly Plane[] = ['axial', 'coronal', 'sagittal'];
export const PLANE_LABELS: Readonly<Record<Plane, string>> = { axial: 'Axial', coronal: 'Coronal', sagittal: 'Sagittal' };

type Axis = 0 | 1 | 2;

/**
 * How one plane's slices of a voxel grid lie on screen. Display follows the radiological convention
 * (common practice): axial and coronal show the patient's right on screen left; axial has anterior up,
 * coronal and sagittal superior up, sagittal anterior on the left. Every screen axis therefore runs
 * towards −world (RAS), which is why one flip rule serves all three planes.
 */
export interface SliceLayout {
  plane: Plane;
  /** Grid axes across the slices, along screen columns and along screen rows. */
  sliceAxis: Axis;
  colAxis: Axis;
  rowAxis: Axis;
  /** Grid index falls as the screen coordinate grows. */
  colFlip: boolean;
  rowFlip: boolean;
  /** Grid index rises towards −world along the slice axis (so "up a slice" lowers it). */
  sliceFlip: boolean;
  width: number;
  height: number;
  depth: number;
  /** Voxel steps in mm along columns, rows and slices. */
  colMm: number;
  rowMm: number;
  sliceMm: number;
}

/** World axis (0 x R, 1 y A, 2 z S) that each plane's slice, column and row follow. */
const WORLD: Record<Plane, { slice: Axis; col: Axis; row: Axis }> = {
  axial: { slice: 2, col: 0, row: 1 },
  coronal: { slice: 1, col: 0, row: 2 },
  sagittal: { slice: 0, col: 1, row: 2 },
};

/**
 * For each world axis, the grid axis nearest it. The S axis is the core's axial axis (plane normal
 * nearest S), so the viewer's axial slices are the slices the analysis measures in; the other two
 * grid axes go to R and A in whichever pairing is closer. Flipped and oblique grids are thus shown
 * by their nearest grid planes, not resampled.
 */
export function gridAxesOfWorld(affine: Mat4): [Axis, Axis, Axis] {
  const s = axialAxis(affine);
  const [a, b] = ([0, 1, 2] as const).filter((c) => c !== s);
  const cos = (grid: number, world: number) => Math.abs(affine[world * 4 + grid]) / Math.hypot(affine[grid], affine[4 + grid], affine[8 + grid]);
  return cos(a, 0) + cos(b, 1) >= cos(b, 0) + cos(a, 1) ? [a, b, s] : [b, a, s];
}

export function sliceLayout(dims: readonly [number, number, number], affine: Mat4, spacingMm: readonly [number, number, number], plane: Plane): SliceLayout {
  const grid = gridAxesOfWorld(affine);
  const w = WORLD[plane];
  const sliceAxis = grid[w.slice], colAxis = grid[w.col], rowAxis = grid[w.row];
  // Positive when the grid index runs towards +world along the world axis it stands for.
  const towardsPlus = (g: Axis, world: Axis) => affine[world * 4 + g] > 0;
  return {
    plane,
    sliceAxis,
    colAxis,
    rowAxis,
    colFlip: towardsPlus(colAxis, w.col),
    rowFlip: towardsPlus(rowAxis, w.row),
    sliceFlip: !towardsPlus(sliceAxis, w.slice),
    width: dims[colAxis],
    height: dims[rowAxis],
    depth: dims[sliceAxis],
    colMm: spacingMm[colAxis],
    rowMm: spacingMm[rowAxis],
    sliceMm: spacingMm[sliceAxis],
  };
}

/** Grid index change that moves one slice towards +world (superior for axial, anterior for coronal, right for sagittal). */
export function sliceStepTowardsPlus(layout: SliceLayout): 1 | -1 {
  return layout.sliceFlip ? -1 : 1;
}

/** Anything indexable by number: the typed arrays of volumes and label maps. */
export interface NumberArray {
  readonly length: number;
  [n: number]: number;
}

/**
 * Copies slice `slice` of a grid (i fastest, NIfTI order) into `out` (width × height, row-major in
 * screen order). The index steps are worked out once, so the loop does one add per pixel.
 */
export function extractSlice(src: NumberArray, dims: readonly [number, number, number], layout: SliceLayout, slice: number, out: NumberArray): void {
  const stride = [1, dims[0], dims[0] * dims[1]];
  const { width, height } = layout;
  const colStep = layout.colFlip ? -stride[layout.colAxis] : stride[layout.colAxis];
  const rowStep = layout.rowFlip ? -stride[layout.rowAxis] : stride[layout.rowAxis];
  const origin = slice * stride[layout.sliceAxis]
    + (layout.colFlip ? (width - 1) * stride[layout.colAxis] : 0)
    + (layout.rowFlip ? (height - 1) * stride[layout.rowAxis] : 0);
  let o = 0;
  for (let r = 0; r < height; r++) {
    let n = origin + r * rowStep;
    for (let c = 0; c < width; c++) {
      out[o++] = src[n];
      n += colStep;
    }
  }
}

/** Grid coordinates (may be fractional) of a display position: column, row (voxel units) and slice. */
export function gridOfDisplay(layout: SliceLayout, col: number, row: number, slice: number): [number, number, number] {
  const g: [number, number, number] = [0, 0, 0];
  g[layout.colAxis] = layout.colFlip ? layout.width - 1 - col : col;
  g[layout.rowAxis] = layout.rowFlip ? layout.height - 1 - row : row;
  g[layout.sliceAxis] = slice;
  return g;
}

/**
 * Display millimetres: the slice image laid out at its voxel spacing, origin at its top-left corner,
 * so voxel (col, row) covers [col·colMm, (col+1)·colMm) and its centre sits half a voxel in.
 */
export function worldOfDisplayMm(layout: SliceLayout, affine: Mat4, xMm: number, yMm: number, slice: number): Vec3 {
  return transformPoint(affine, gridOfDisplay(layout, xMm / layout.colMm - 0.5, yMm / layout.rowMm - 0.5, slice));
}

/** A world point in display mm, with its (fractional) slice index. */
export function displayMmOfWorld(layout: SliceLayout, inverse: Mat4, p: Vec3): { xMm: number; yMm: number; slice: number } {
  const g = transformPoint(inverse, p);
  const col = layout.colFlip ? layout.width - 1 - g[layout.colAxis] : g[layout.colAxis];
  const row = layout.rowFlip ? layout.height - 1 - g[layout.rowAxis] : g[layout.rowAxis];
  return { xMm: (col + 0.5) * layout.colMm, yMm: (row + 0.5) * layout.rowMm, slice: g[layout.sliceAxis] };
}

/** Linear index (i fastest) of a voxel given by display column, row and slice; -1 outside the grid. */
export function voxelIndexOfDisplay(layout: SliceLayout, dims: readonly [number, number, number], col: number, row: number, slice: number): number {
  if (col < 0 || row < 0 || col >= layout.width || row >= layout.height || slice < 0 || slice >= layout.depth) return -1;
  const g = gridOfDisplay(layout, col, row, slice);
  return g[0] + dims[0] * (g[1] + dims[1] * g[2]);
}
