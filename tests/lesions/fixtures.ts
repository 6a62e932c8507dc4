import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { SegmentMap, SegmentName } from '../../src/segments/segment-map.js';
import { makeVolume, type Datatype, type Volume, type VoxelArray } from '../../src/volume/volume.js';

export type Dims = [number, number, number];

/** Voxel→world affine R·diag(spacing) + origin, R = Rz·Ry·Rx: perpendicular columns, any tilt. */
export function obliqueAffine(spacing: readonly number[], angles: readonly number[], origin: readonly number[]): number[] {
  const [a, b, c] = angles;
  const rx = [1, 0, 0, 0, Math.cos(a), -Math.sin(a), 0, Math.sin(a), Math.cos(a)];
  const ry = [Math.cos(b), 0, Math.sin(b), 0, 1, 0, -Math.sin(b), 0, Math.cos(b)];
  const rz = [Math.cos(c), -Math.sin(c), 0, Math.sin(c), Math.cos(c), 0, 0, 0, 1];
  const mul = (p: number[], q: number[]) =>
    [0, 1, 2].flatMap((r) => [0, 1, 2].map((col) => p[3 * r] * q[col] + p[3 * r + 1] * q[3 + col] + p[3 * r + 2] * q[6 + col]));
  const R = mul(rz, mul(ry, rx));
  return [
    R[0] * spacing[0], R[1] * spacing[1], R[2] * spacing[2], origin[0],
    R[3] * spacing[0], R[4] * spacing[1], R[5] * spacing[2], origin[1],
    R[6] * spacing[0], R[7] * spacing[1], R[8] * spacing[2], origin[2],
    0, 0, 0, 1,
  ];
}

/** Sets `value` at every voxel whose centre passes `inside(x, y, z)` (world mm). */
export function paint(
  data: VoxelArray,
  dims: Dims,
  affine: readonly number[],
  inside: (x: number, y: number, z: number) => boolean,
  value: number,
): void {
  const [nx, ny, nz] = dims;
  const A = affine;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const x = A[0] * i + A[1] * j + A[2] * k + A[3];
        const y = A[4] * i + A[5] * j + A[6] * k + A[7];
        const z = A[8] * i + A[9] * j + A[10] * k + A[11];
        if (inside(x, y, z)) data[i + nx * (j + ny * k)] = value;
      }
    }
  }
}

/** Inside test of an ellipsoid with semi-axes (mm) along the world axes turned by `angles` (as obliqueAffine). */
export function ellipsoid(centre: readonly number[], semi: readonly number[], angles: readonly number[] = [0, 0, 0]) {
  const R = obliqueAffine([1, 1, 1], angles, [0, 0, 0]);
  return (x: number, y: number, z: number) => {
    const d = [x - centre[0], y - centre[1], z - centre[2]];
    // Body coordinates: Rᵀ·d.
    const u = R[0] * d[0] + R[4] * d[1] + R[8] * d[2];
    const v = R[1] * d[0] + R[5] * d[1] + R[9] * d[2];
    const w = R[2] * d[0] + R[6] * d[1] + R[10] * d[2];
    return (u / semi[0]) ** 2 + (v / semi[1]) ** 2 + (w / semi[2]) ** 2 <= 1;
  };
}

/** Deterministic pseudo-random int16 scan values (a linear congruential generator). */
export function noiseScan(dims: Dims, seed = 12345): Int16Array {
  const out = new Int16Array(dims[0] * dims[1] * dims[2]);
  let s = seed >>> 0;
  for (let n = 0; n < out.length; n++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    out[n] = (s >>> 16) % 2000 - 1000;
  }
  return out;
}

/** The default scheme's values 1–8 as segments I–VIII, written out so the tests do not lean on it. */
export const SCHEME: ReadonlyMap<number, SegmentName> = new Map<number, SegmentName>([
  [1, 'I'], [2, 'II'], [3, 'III'], [4, 'IV'], [5, 'V'], [6, 'VI'], [7, 'VII'], [8, 'VIII'],
]);

export function segmentMap(labels: Volume): SegmentMap {
  return { labels, scheme: SCHEME };
}

export function volume(dims: Dims, data: VoxelArray, affine: number[], datatype: Datatype, slope = 1, inter = 0): Volume {
  return makeVolume(dims, data, affine, datatype, slope, inter);
}

/** A fresh folder under the system temp folder for raw arrays handed to the reference scripts. */
export function scratchDir(): string {
  return mkdtempSync(join(tmpdir(), 'falciform-lesions-'));
}

export function writeRaw(dir: string, name: string, data: VoxelArray): string {
  const path = join(dir, name);
  writeFileSync(path, new Uint8Array(data.buffer, data.byteOffset, data.byteLength));
  return path;
}

/**
 * Runs a reference script with Debian's python3 (which ships scipy, scikit-image and nibabel) on a
 * JSON job and returns its JSON answer.
 */
export function runPython(script: string, job: unknown, dir: string): unknown {
  const jobPath = join(dir, 'job.json');
  writeFileSync(jobPath, JSON.stringify(job));
  const r = spawnSync('/usr/bin/python3', [script, jobPath], { encoding: 'utf8', maxBuffer: 1 << 28 });
  if (r.status !== 0) throw new Error(`${script} failed: ${r.stderr || r.error?.message}`);
  return JSON.parse(r.stdout);
}
