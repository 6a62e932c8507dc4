/** A voxel grid's size (i fastest) and its voxel steps in mm. */
export type Dims = readonly [number, number, number];

/** An index-space box of a grid: first voxel (i0, j0, k0) and size (bx, by, bz). */
export interface Box {
  i0: number; j0: number; k0: number;
  bx: number; by: number; bz: number;
}

export function wholeBox(dims: Dims): Box {
  return { i0: 0, j0: 0, k0: 0, bx: dims[0], by: dims[1], bz: dims[2] };
}

/** Smallest box holding every non-zero voxel of the mask; null when there is none. */
export function maskBox(mask: Uint8Array, dims: Dims): Box | null {
  const [nx, ny, nz] = dims;
  let iMin = nx, iMax = -1, jMin = ny, jMax = -1, kMin = nz, kMax = -1;
  let n = 0;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      let first = -1, last = -1;
      for (let i = 0; i < nx; i++, n++) {
        if (mask[n] !== 0) {
          if (first < 0) first = i;
          last = i;
        }
      }
      if (first < 0) continue;
      if (first < iMin) iMin = first;
      if (last > iMax) iMax = last;
      if (j < jMin) jMin = j;
      if (j > jMax) jMax = j;
      if (k < kMin) kMin = k;
      kMax = k;
    }
  }
  if (iMax < 0) return null;
  return { i0: iMin, j0: jMin, k0: kMin, bx: iMax - iMin + 1, by: jMax - jMin + 1, bz: kMax - kMin + 1 };
}

/** The box grown by `grow` voxels per axis, clipped to the grid. */
export function growBox(b: Box, grow: readonly number[], dims: Dims): Box {
  const i0 = Math.max(0, b.i0 - grow[0]), j0 = Math.max(0, b.j0 - grow[1]), k0 = Math.max(0, b.k0 - grow[2]);
  const i1 = Math.min(dims[0] - 1, b.i0 + b.bx - 1 + grow[0]);
  const j1 = Math.min(dims[1] - 1, b.j0 + b.by - 1 + grow[1]);
  const k1 = Math.min(dims[2] - 1, b.k0 + b.bz - 1 + grow[2]);
  return { i0, j0, k0, bx: i1 - i0 + 1, by: j1 - j0 + 1, bz: k1 - k0 + 1 };
}

/** Voxels per axis that a length of `mm` spans at these spacings (rounded up). */
export function voxelsForMm(spacingMm: readonly number[], mm: number): [number, number, number] {
  return [0, 1, 2].map((a) => Math.ceil(mm / spacingMm[a] - 1e-9)) as [number, number, number];
}
