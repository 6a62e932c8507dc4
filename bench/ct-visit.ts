// Invented CT-like visits for the benchmarks: an int16 scan with scanner-like noise everywhere (air
// included), so its .nii.gz compresses about 2:1 like a real abdominal CT rather than 10:1 like a clean
// phantom, with a uint8 segment map (values 1–8 = I–VIII) and a uint8 lesion mask on the same grid.
// Deterministic from the seed.
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { gzip } from 'node:zlib';
import { encodeNifti } from '../src/volume/nifti-write.js';
import { makeVolume } from '../src/volume/volume.js';

const gzipAsync = promisify(gzip);

export interface BenchLesion {
  /** Centre as a fraction of the grid along i, j, k. */
  at: [number, number, number];
  /** Semi-axes in mm. */
  semiMm: [number, number, number];
}

export interface VisitSpec {
  dims: [number, number, number];
  spacingMm: [number, number, number];
  lesions: BenchLesion[];
  seed: number;
}

export interface WrittenVisit {
  scan: string;
  segments: string;
  lesions: string;
  /** Bytes on disk of the three .nii.gz files, and of the same files uncompressed. */
  gzBytes: number;
  rawBytes: number;
  /** The scan's own uncompressed / compressed ratio. */
  scanRatio: number;
}

/** A usual NIfTI from DICOM: i towards patient left is -x, j towards posterior is -y. */
export function benchAffine(dims: readonly number[], s: readonly number[]): number[] {
  return [-s[0], 0, 0, (s[0] * dims[0]) / 2, 0, -s[1], 0, (s[1] * dims[1]) / 2, 0, 0, s[2], (-s[2] * dims[2]) / 2, 0, 0, 0, 1];
}

/** Liver ellipsoid (in grid fractions) cut into segments by index-space planes; segment I a ball near the hilum. */
function segmentLabel(x: number, y: number, z: number): number {
  const a = (x - 0.39) / 0.29, b = (y - 0.49) / 0.2, c = (z - 0.5) / 0.37;
  if (a * a + b * b + c * c >= 1) return 0;
  const h = (x - 0.46) / 0.035, g = (y - 0.55) / 0.035, f = (z - 0.5) / 0.06;
  if (h * h + g * g + f * f < 1) return 1;
  const upper = z >= 0.5;
  if (x >= 0.51) return upper ? 7 : 6;
  if (x >= 0.39) return upper ? 8 : 5;
  if (x >= 0.29) return 4;
  return upper ? 2 : 3;
}

/** The three volumes of one visit, in memory. */
export function makeVisitVolumes(spec: VisitSpec): { scan: Int16Array; segments: Uint8Array; lesions: Uint8Array } {
  const [nx, ny, nz] = spec.dims;
  const n = nx * ny * nz;
  const scan = new Int16Array(n), segments = new Uint8Array(n), lesions = new Uint8Array(n);
  // Lesions as boxes of voxels to test, so the voxel loop stays cheap with many lesions.
  const boxes = spec.lesions.map((l) => {
    const c = l.at.map((f, d) => f * spec.dims[d]);
    const r = l.semiMm.map((mm, d) => mm / spec.spacingMm[d]);
    return { c, r, lo: c.map((x, d) => Math.floor(x - r[d])), hi: c.map((x, d) => Math.ceil(x + r[d])) };
  });
  let rng = spec.seed >>> 0 || 1;
  let v = 0;
  for (let k = 0; k < nz; k++) {
    const z = k / nz;
    const here = boxes.filter((b) => k >= b.lo[2] && k <= b.hi[2]);
    for (let j = 0; j < ny; j++) {
      const y = j / ny;
      const row = here.filter((b) => j >= b.lo[1] && j <= b.hi[1]);
      for (let i = 0; i < nx; i++, v++) {
        const x = i / nx;
        // xorshift32; the sum of its four bytes is near-Gaussian (sd ≈ 148), scaled to sd ≈ 18 HU,
        // about the noise of an abdominal CT (common practice).
        rng ^= rng << 13; rng ^= rng >>> 17; rng ^= rng << 5; rng >>>= 0;
        const noise = ((rng & 255) + ((rng >>> 8) & 255) + ((rng >>> 16) & 255) + (rng >>> 24) - 510) * 0.125;
        const bx = (x - 0.5) / 0.46, by = (y - 0.5) / 0.34;
        const body = bx * bx + by * by;
        const sx = (x - 0.5) / 0.05, sy = (y - 0.72) / 0.05;
        let hu = body >= 1 ? -1000 : body > 0.85 ? -100 : sx * sx + sy * sy < 1 ? 700 : 40;
        const s = segmentLabel(x, y, z);
        segments[v] = s;
        if (s > 0) {
          hu = 60;
          for (const b of row) {
            if (i < b.lo[0] || i > b.hi[0]) continue;
            const p = (i - b.c[0]) / b.r[0], q = (j - b.c[1]) / b.r[1], t = (k - b.c[2]) / b.r[2];
            if (p * p + q * q + t * t <= 1) {
              lesions[v] = 1;
              hu = 25;
              break;
            }
          }
        }
        scan[v] = Math.round(hu + noise);
      }
    }
  }
  return { scan, segments, lesions };
}

/** Writes scan.nii.gz, segments.nii.gz and lesions.nii.gz (gzip level 6, the usual default) into `dir`. */
export async function writeCtVisit(dir: string, spec: VisitSpec): Promise<WrittenVisit> {
  const { scan, segments, lesions } = makeVisitVolumes(spec);
  const affine = benchAffine(spec.dims, spec.spacingMm);
  const raws = [
    encodeNifti(makeVolume(spec.dims, scan, affine, 'int16'), 'int16'),
    encodeNifti(makeVolume(spec.dims, segments, affine, 'uint8'), 'uint8'),
    encodeNifti(makeVolume(spec.dims, lesions, affine, 'uint8'), 'uint8'),
  ];
  const gz = await Promise.all(raws.map((r) => gzipAsync(r, { level: 6 })));
  const names = ['scan', 'segments', 'lesions'].map((f) => join(dir, `${f}.nii.gz`));
  await Promise.all(names.map((f, n) => writeFile(f, gz[n])));
  return {
    scan: names[0],
    segments: names[1],
    lesions: names[2],
    gzBytes: gz.reduce((s, b) => s + b.length, 0),
    rawBytes: raws.reduce((s, b) => s + b.length, 0),
    scanRatio: raws[0].length / gz[0].length,
  };
}

/** Six lesions of the single-visit benchmarks: large, border-crossing, small and elongated ones. */
export const SIX_LESIONS: BenchLesion[] = [
  { at: [0.45, 0.45, 0.72], semiMm: [20, 20, 20] },
  { at: [0.59, 0.51, 0.37], semiMm: [15, 10, 12] },
  { at: [0.39, 0.49, 0.4], semiMm: [8, 8, 8] },
  { at: [0.23, 0.47, 0.33], semiMm: [5, 5, 5] },
  { at: [0.21, 0.53, 0.63], semiMm: [20, 12, 15] },
  { at: [0.47, 0.59, 0.3], semiMm: [3, 3, 3] },
];

/** The CT-like 512×512×300 visit (0.7 × 0.7 × 0.8 mm) the app and command-line benchmarks share. */
export const CT_VISIT: VisitSpec = { dims: [512, 512, 300], spacingMm: [0.7, 0.7, 0.8], lesions: SIX_LESIONS, seed: 7 };

/** Cores of this machine, printed beside every figure. */
export async function coreLine(): Promise<string> {
  const { availableParallelism, cpus } = await import('node:os');
  return `${availableParallelism()} cores (${cpus()[0]?.model.trim() ?? 'unknown CPU'}), node ${process.version}`;
}
