import type { Mat4 } from '../geometry/mat4.js';
import { badFile } from '../errors.js';
import { gridToGrid } from '../volume/resample.js';
import { makeVolume, voxelIndexAtWorld, type Volume } from '../volume/volume.js';
import { checkLandmarks, type LandmarkSet } from './landmarks.js';
import { landmarkPlanes, type Plane } from './planes.js';
import { defaultScheme, SEGMENT_CODES } from './scheme.js';
import type { SegmentMap, SegmentName } from './segment-map.js';

export interface BuildOptions {
  /** Caudate (segment I) mask, on any grid; voxels > 0 are caudate. */
  caudate?: Volume;
  /** Split IV into IVa (above the portal plane, 4) and IVb (below, 9). */
  splitIV?: boolean;
  /** Landmark file name for error messages. */
  file?: string;
  /** Liver mask file name for error messages. */
  liverFile?: string;
  /** Caudate mask file name for warnings. */
  caudateFile?: string;
}

/**
 * Said wherever segments of a landmark-built map are shown: the real borders follow curved veins and
 * fissures, the plane rule cuts with flat planes through a few vessel points.
 */
export const PLANE_APPROXIMATION =
  'Segment map built from landmarks: an approximation by flat planes through vessel points; real segment ' +
  'borders are curved, so check the segments on the images.';

/**
 * Builds a segment map from a landmark set by the plane rule (brief, plane method) on the liver
 * mask's grid: uint8 labels with the default scheme's values (1–8; with splitIV 4 = IVa, 9 = IVb).
 * Liver voxels are those with value > 0. Segment I comes only from the caudate mask.
 */
export function buildSegmentMap(
  liver: Volume,
  landmarks: LandmarkSet,
  opts: BuildOptions = {},
): { map: SegmentMap; warnings: string[] } {
  const file = opts.file ?? 'landmark set';
  checkLandmarks(landmarks, file);
  const planes = landmarkPlanes(landmarks);
  const split = opts.splitIV === true;
  const warnings: string[] = [];

  const [nx, ny, nz] = liver.dims;
  const A = liver.affine;
  // n·(A·ijk + t − q) is linear in (i, j, k): one multiply-add per axis step instead of a world transform.
  const R = indexPlane(planes.rightHepatic, A);
  const M = indexPlane(planes.middleHepatic, A);
  const U = indexPlane(planes.umbilical, A);
  const H = indexPlane(planes.portal, A);
  const L = indexPlane(planes.leftLateral, A);
  if (!landmarks.points.left_portal_umbilical) {
    warnings.push('segments II and III are divided by the main portal plane (an approximation); add left_portal_umbilical (the umbilical part of the left portal vein) to the landmark set to divide them there');
  }
  // Labels as locals: the loop below then reads no object properties.
  const I = SEGMENT_CODES.I, II = SEGMENT_CODES.II, III = SEGMENT_CODES.III, V = SEGMENT_CODES.V;
  const VI = SEGMENT_CODES.VI, VII = SEGMENT_CODES.VII, VIII = SEGMENT_CODES.VIII;
  const IVa = SEGMENT_CODES.IVa, IVb = split ? SEGMENT_CODES.IVb : SEGMENT_CODES.IV;

  const caudate = opts.caudate ? caudateLookup(opts.caudate, liver) : null;
  const data = liver.data;
  const slope = liver.slope;
  const inter = liver.inter;
  const out = new Uint8Array(nx * ny * nz);
  const counts = new Float64Array(16);
  let liverVoxels = 0;

  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const row = nx * (j + ny * k);
      const r0 = R[3] + R[1] * j + R[2] * k, ri = R[0];
      const m0 = M[3] + M[1] * j + M[2] * k, mi = M[0];
      const u0 = U[3] + U[1] * j + U[2] * k, ui = U[0];
      const h0 = H[3] + H[1] * j + H[2] * k, hi = H[0];
      const l0 = L[3] + L[1] * j + L[2] * k, li = L[0];
      for (let i = 0; i < nx; i++) {
        const n = row + i;
        if (!(data[n] * slope + inter > 0)) continue;
        liverVoxels++;
        let label: number;
        if (caudate !== null && caudate.at(i, j, k)) label = I;
        else {
          const up = h0 + hi * i > 0;
          if (r0 + ri * i > 0) label = up ? VII : VI;
          else if (m0 + mi * i > 0) label = up ? VIII : V;
          else if (u0 + ui * i > 0) label = up ? IVa : IVb;
          else label = l0 + li * i > 0 ? II : III;
        }
        out[n] = label;
        counts[label]++;
      }
    }
  }

  if (liverVoxels === 0) throw badFile(opts.liverFile ?? 'liver mask', 'the liver mask has no voxel above 0');
  if (!caudate) warnings.push('no caudate mask given: segment I is left out (its voxels take the segment of the plane rule)');
  else if (counts[SEGMENT_CODES.I] === 0) {
    warnings.push(`${opts.caudateFile ?? 'caudate mask'}: no caudate voxel lies inside the liver mask; segment I is left out`);
  }
  if (voxelIndexAtWorld(liver, landmarks.points.portal_bifurcation) < 0) {
    warnings.push(`${file}: portal_bifurcation lies outside the liver mask's grid; are the landmarks in RAS mm of this scan?`);
  }
  const expected: SegmentName[] = ['II', 'III', ...(split ? (['IVa', 'IVb'] as const) : (['IV'] as const)), 'V', 'VI', 'VII', 'VIII'];
  const empty = expected.filter((s) => counts[SEGMENT_CODES[s]] === 0);
  if (empty.length > 0) {
    warnings.push(`segment${empty.length > 1 ? 's' : ''} ${empty.join(', ')} got no voxels; check the landmarks against the scan`);
  }
  const labels = makeVolume(liver.dims, out, liver.affine, 'uint8');
  // The loop counted every label already; the map carries the counts so its volumes need no recount.
  const labelCounts = new Map<number, number>();
  if (out.length > liverVoxels) labelCounts.set(0, out.length - liverVoxels);
  counts.forEach((c, label) => {
    if (c > 0) labelCounts.set(label, c);
  });
  return { map: { labels, scheme: defaultScheme(split), labelCounts }, warnings };
}

/** Plane coefficients in voxel index space: d(i, j, k) = c[0]·i + c[1]·j + c[2]·k + c[3] (mm). */
function indexPlane(plane: Plane, A: Mat4): [number, number, number, number] {
  const [a, b, c] = plane.normal;
  const q = plane.point;
  return [
    a * A[0] + b * A[4] + c * A[8],
    a * A[1] + b * A[5] + c * A[9],
    a * A[2] + b * A[6] + c * A[10],
    a * (A[3] - q[0]) + b * (A[7] - q[1]) + c * (A[11] - q[2]),
  ];
}

/**
 * Caudate membership for liver voxel (i, j, k): the caudate voxel nearest the same world point, as
 * `voxelIndexAtWorld` would find it, but with the liver→caudate index map precomputed.
 */
function caudateLookup(caudate: Volume, liver: Volume): { at(i: number, j: number, k: number): boolean } {
  const [cx, cy, cz] = caudate.dims;
  const data = caudate.data;
  const slope = caudate.slope;
  const inter = caudate.inter;
  const T = gridToGrid(liver, caudate);
  return {
    at(i, j, k) {
      const a = Math.round(T[0] * i + T[1] * j + T[2] * k + T[3]);
      const b = Math.round(T[4] * i + T[5] * j + T[6] * k + T[7]);
      const c = Math.round(T[8] * i + T[9] * j + T[10] * k + T[11]);
      if (a < 0 || b < 0 || c < 0 || a >= cx || b >= cy || c >= cz) return false;
      return data[a + cx * (b + cy * c)] * slope + inter > 0;
    },
  };
}
