// A small invented patient folder for the store tests: two visits on different grids, one with a
// segment map and a lesion mask, the other with a liver mask, a landmark set and manual marks.
// Volumes are encoded with the project's NIfTI writer and gzipped with node:zlib, as a scanner
// export tool would write them.
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { gzipSync } from 'node:zlib';
import type { OpenedFile } from '../../main/bridge-api.js';
import { encodeNifti } from '../../src/volume/nifti-write.js';
import { makeVolume, type Volume } from '../../src/volume/volume.js';

type V3 = [number, number, number];

const enc = new TextEncoder();

/** Diagonal affine with the grid centred on `centre` (world RAS mm). */
export function centredAffine(dims: V3, spacing: V3, centre: V3): number[] {
  const t = [0, 1, 2].map((c) => centre[c] - (spacing[c] * (dims[c] - 1)) / 2);
  return [spacing[0], 0, 0, t[0], 0, spacing[1], 0, t[1], 0, 0, spacing[2], t[2], 0, 0, 0, 1];
}

function world(affine: number[], i: number, j: number, k: number): V3 {
  return [affine[0] * i + affine[3], affine[5] * j + affine[7], affine[10] * k + affine[11]];
}

function fill<T extends Uint8Array | Int16Array>(out: T, dims: V3, affine: number[], f: (p: V3) => number): T {
  let n = 0;
  for (let k = 0; k < dims[2]; k++) for (let j = 0; j < dims[1]; j++) for (let i = 0; i < dims[0]; i++) out[n++] = f(world(affine, i, j, k));
  return out;
}

const LIVER_CENTRE: V3 = [30, 0, 15];
const inLiver = (p: V3) => ((p[0] - LIVER_CENTRE[0]) / 70) ** 2 + ((p[1] - LIVER_CENTRE[1]) / 50) ** 2 + ((p[2] - LIVER_CENTRE[2]) / 45) ** 2 <= 1;
const near = (p: V3, c: V3, r: number) => (p[0] - c[0]) ** 2 + (p[1] - c[1]) ** 2 + (p[2] - c[2]) ** 2 <= r * r;

/** A CT-like int16 scan: body, brighter liver, darker lesions, and seeded noise as real scans have. */
export function scanVolume(dims: V3, affine: number[], lesions: { c: V3; r: number }[], seed = 7): Volume {
  let s = seed >>> 0;
  const noise = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return (s >>> 24) / 12 - 10;
  };
  const data = fill(new Int16Array(dims[0] * dims[1] * dims[2]), dims, affine, (p) => {
    const body = (p[0] / 110) ** 2 + (p[1] / 80) ** 2 <= 1;
    const base = !body ? -1000 : lesions.some((l) => near(p, l.c, l.r)) ? 25 : inLiver(p) ? 60 : 35;
    return Math.round(base + noise());
  });
  return makeVolume(dims, data, affine, 'int16');
}

function labelVolume(dims: V3, affine: number[], f: (p: V3) => number): Volume {
  return makeVolume(dims, fill(new Uint8Array(dims[0] * dims[1] * dims[2]), dims, affine, f), affine, 'uint8');
}

/** Segments by simple slabs inside the liver (values of the default scheme). */
function segmentOf(p: V3): number {
  if (!inLiver(p)) return 0;
  const upper = p[2] > 15;
  if (p[0] > 60) return upper ? 7 : 6;
  if (p[0] > 25) return upper ? 8 : 5;
  if (p[0] > -5) return 4;
  return upper ? 2 : 3;
}

export const LANDMARKS = {
  space: 'RAS',
  units: 'mm',
  points: {
    ivc_superior: [18, -30, 50],
    ivc_inferior: [15, -35, -20],
    right_hepatic_vein: [80, -10, 45],
    middle_hepatic_vein: [25, 20, 45],
    umbilical_fissure: [-15, 25, 20],
    portal_bifurcation: [10, 0, 15],
  },
};

export const gz = (v: Volume, datatype: 'uint8' | 'int16') => new Uint8Array(gzipSync(encodeNifti(v, datatype)));
const json = (x: unknown) => enc.encode(JSON.stringify(x, null, 2));

export interface FolderOptions {
  id?: string;
  root?: string;
  /** Only the first visit. */
  oneVisit?: boolean;
  /** Write visit 1's segment map as a plain .nii. */
  plainSegments?: boolean;
}

/** The files of a patient folder, paths relative to the folder's parent (as a folder picker gives them). */
export function patientFolder(opts: FolderOptions = {}): OpenedFile[] {
  const id = opts.id ?? 'DEMO-0101';
  const root = opts.root ?? id;
  const d1: V3 = [64, 48, 40];
  const a1 = centredAffine(d1, [3, 3, 3], [20, 0, 15]);
  const l1 = [{ c: [45, 5, 10] as V3, r: 9 }, { c: [0, -10, 25] as V3, r: 6 }];
  const d2: V3 = [56, 44, 36];
  const a2 = centredAffine(d2, [3.4, 3.2, 3.3], [18, 2, 14]);
  const l2 = [{ c: [45, 5, 10] as V3, r: 7 }];
  const segName = opts.plainSegments ? 'segments.nii' : 'segments.nii.gz';
  const segments = labelVolume(d1, a1, segmentOf);
  const files: [string, Uint8Array][] = [
    ['v1/scan.nii.gz', gz(scanVolume(d1, a1, l1), 'int16')],
    [`v1/${segName}`, opts.plainSegments ? encodeNifti(segments, 'uint8') : gz(segments, 'uint8')],
    ['v1/lesions.nii.gz', gz(labelVolume(d1, a1, (p) => (l1.some((l) => near(p, l.c, l.r)) ? 1 : 0)), 'uint8')],
  ];
  const visits: object[] = [
    { id: 'v1', date: '2026-01-12', scan: 'v1/scan.nii.gz', segments: `v1/${segName}`, scheme: 'default', lesions: 'v1/lesions.nii.gz' },
  ];
  if (!opts.oneVisit) {
    files.push(
      ['v2/scan.nii.gz', gz(scanVolume(d2, a2, l2, 11), 'int16')],
      ['v2/liver.nii.gz', gz(labelVolume(d2, a2, (p) => (inLiver(p) ? 1 : 0)), 'uint8')],
      ['v2/landmarks.json', json(LANDMARKS)],
      ['v2/marks.json', json({ space: 'RAS', units: 'mm', marks: [{ id: 'M1', centreMm: [45, 5, 10], longestAxialMm: 14.2, shortAxisMm: 12.9 }] })],
    );
    visits.push({ id: 'v2', date: '2026-03-02', scan: 'v2/scan.nii.gz', liver: 'v2/liver.nii.gz', landmarks: 'v2/landmarks.json', marks: 'v2/marks.json' });
  }
  const manifest = {
    patient: { id, birthYear: 1958, heightCm: 171, weightKg: 77, sex: 'female', demo: true },
    marginMm: 10,
    visits,
    treatments: [{ date: '2026-01-20', kind: 'therapy-start', label: 'invented regimen A' }],
  };
  files.unshift(['manifest.json', json(manifest)]);
  return files.map(([path, bytes]) => ({ relativePath: `${root}/${path}`, bytes }));
}

/** Replaces (or adds) one file of a folder. */
export function withFile(files: OpenedFile[], relativePath: string, bytes: Uint8Array): OpenedFile[] {
  const rest = files.filter((f) => f.relativePath !== relativePath);
  return [...rest, { relativePath, bytes }];
}

export const textFile = (x: unknown) => json(x);

/** Writes files under dir (for the browser test's folder picker). */
export function writeFiles(dir: string, files: OpenedFile[]): void {
  for (const f of files) {
    const path = join(dir, f.relativePath);
    mkdirSync(dirname(path), { recursive: true });
    writeFileSync(path, f.bytes);
  }
}
