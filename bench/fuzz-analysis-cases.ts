// Fuzzing the analysis stage: valid NIfTI files whose content is hostile (all-set masks, the
// eight-voxel lattice, thousands of one-voxel lesions, extreme or NaN scaling, singular or mirrored
// affines, maps off the scan, a thin viable ring), run through `falciform analyze` and `followup` as
// child processes. Shared by bench/fuzz-analysis.ts (every class, up to 512×512×300 bombs) and
// tests/fuzz/analysis.test.ts (small grids).
//
// The rule: each case ends in exit 0 with a correct result, or exit 3 with one short stderr line,
// within its time budget (5 s; 1 minute for the bombs) of CPU time, and within four times that of
// wall time (a shared machine stretches wall time), with peak RSS at most 1.5× the decompressed inputs
// above the CLI's working set (measured by /usr/bin/time -v on the child). The working set is the
// CLI at rest plus WORKING_SET_BYTES for the JavaScript heap (lesion records up to the cap, the JSON
// written out, two visits of 1,000 lesions matched), which does not grow with the grid.
import { spawn } from 'node:child_process';
import { mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import type { Mat4 } from '../src/geometry/mat4.js';
import { encodeNifti, type WriteDatatype } from '../src/volume/nifti-write.js';
import { makeVolume } from '../src/volume/volume.js';

type Dims = readonly [number, number, number];

export type Size = 'small' | 'bench' | 'bomb';
export const CLASSES = ['all-set', 'lattice', 'one-voxel', 'scaling', 'affine', 'no-overlap', 'ring'] as const;
export type CaseClass = (typeof CLASSES)[number];

export interface CliRun {
  status: number | null;
  /** Wall-clock seconds. */
  seconds: number;
  /** User plus system CPU seconds of the child: what the budget is held to, since a shared machine stretches wall time. */
  cpuSeconds: number;
  peakRssBytes: number;
  stdout: string;
  stderr: string;
}

export interface AnalysisCase {
  cls: CaseClass;
  name: string;
  /** Arguments after `falciform`. */
  argv: string[];
  /** Decompressed bytes of every NIfTI input. */
  inputBytes: number;
  budgetMs: number;
  /** Exit codes this case may end in (0 only when the result can be checked, 3 when refusal is right). */
  allowed: readonly (0 | 3)[];
  /** With exit 0: null when the result is correct, else what is wrong. */
  checkResult?: (json: unknown) => string | null;
}

export const CASE_BUDGET_MS = 5000;
export const BOMB_BUDGET_MS = 60_000;
/** Wall time allowed as a multiple of the CPU budget: a hang fuse that a busy shared machine does not trip. */
export const WALL_FACTOR = 4;
/** Peak RSS allowed per decompressed input byte, above the CLI's resting footprint. */
export const MEMORY_RATIO = 1.5;
/** Heap allowed above the CLI at rest whatever the inputs. */
export const WORKING_SET_BYTES = 128 * 1024 ** 2;

const GRIDS: Record<Size, Dims> = { small: [32, 32, 16], bench: [128, 128, 64], bomb: [512, 512, 300] };
const SPACING = [1.5, 1.5, 3] as const;

/** A grid of `dims` centred on the origin with SPACING voxels; `flipX` mirrors the first axis. */
function gridAffine(dims: Dims, flipX = false, shiftMm = 0): Mat4 {
  const sx = flipX ? -SPACING[0] : SPACING[0];
  const ox = flipX ? ((dims[0] - 1) / 2) * SPACING[0] : -((dims[0] - 1) / 2) * SPACING[0];
  return [sx, 0, 0, ox + shiftMm, 0, SPACING[1], 0, -((dims[1] - 1) / 2) * SPACING[1], 0, 0, SPACING[2], -((dims[2] - 1) / 2) * SPACING[2], 0, 0, 0, 1];
}

interface Written { path: string; bytes: number }

/** Writes a volume as .nii.gz; `patch` edits the header bytes (scaling, a broken affine). */
function writeNifti(path: string, dims: Dims, data: Uint8Array | Int16Array, affine: Mat4, patch?: (v: DataView) => void): Written {
  const datatype: WriteDatatype = data instanceof Int16Array ? 'int16' : 'uint8';
  const bytes = encodeNifti(makeVolume(dims, data, affine, datatype), datatype);
  patch?.(new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength));
  writeFileSync(path, gzipSync(bytes, { level: 1 }));
  return { path, bytes: bytes.byteLength };
}

// NIfTI-1 header offsets (NIfTI-1 standard, nifti1.h).
const SCL_SLOPE = 112, SCL_INTER = 116, QFORM_CODE = 252, SFORM_CODE = 254, SROW_X = 280;

const setScaling = (slope: number, inter: number) => (v: DataView) => {
  v.setFloat32(SCL_SLOPE, slope, true);
  v.setFloat32(SCL_INTER, inter, true);
};

const voxelCount = (d: Dims) => d[0] * d[1] * d[2];

/** A plain scan: a soft gradient in HU, the same for every case of a size. */
function scanData(dims: Dims): Int16Array {
  const out = new Int16Array(voxelCount(dims));
  for (let n = 0; n < out.length; n++) out[n] = 40 + (n % 97);
  return out;
}

/** Eight segments as slabs along x: every voxel is liver, so every lesion lies inside it. */
function segmentData(dims: Dims): Uint8Array {
  const out = new Uint8Array(voxelCount(dims));
  for (let k = 0; k < dims[2]; k++)
    for (let j = 0; j < dims[1]; j++)
      for (let i = 0; i < dims[0]; i++) out[i + dims[0] * (j + dims[1] * k)] = 1 + Math.floor((8 * i) / dims[0]);
  return out;
}

/** One set voxel on every even (i, j, k): the most 26-connected components a grid holds. */
function latticeData(dims: Dims): { data: Uint8Array; count: number } {
  const data = new Uint8Array(voxelCount(dims));
  let count = 0;
  for (let k = 0; k < dims[2]; k += 2)
    for (let j = 0; j < dims[1]; j += 2)
      for (let i = 0; i < dims[0]; i += 2, count++) data[i + dims[0] * (j + dims[1] * k)] = 1;
  return { data, count };
}

/** `want` lattice sites picked by a fixed pseudo-random walk: isolated one-voxel lesions. */
function oneVoxelData(dims: Dims, want: number, salt: number): { data: Uint8Array; count: number } {
  const { data: lattice } = latticeData(dims);
  const sites: number[] = [];
  for (let n = 0; n < lattice.length; n++) if (lattice[n]) sites.push(n);
  let s = 2166136261 ^ salt;
  for (let n = sites.length - 1; n > 0; n--) {
    s = Math.imul(s ^ n, 16777619) >>> 0;
    const m = s % (n + 1);
    [sites[n], sites[m]] = [sites[m], sites[n]];
  }
  const data = new Uint8Array(lattice.length);
  const count = Math.min(want, sites.length);
  for (let n = 0; n < count; n++) data[sites[n]] = 1;
  return { data, count };
}

/** A solid box of lesion in the middle of the grid: one lesion of known size. */
function boxData(dims: Dims): { data: Uint8Array; voxels: number } {
  const data = new Uint8Array(voxelCount(dims));
  const lo = dims.map((d) => Math.floor(d / 4)), hi = dims.map((d) => Math.ceil((3 * d) / 4));
  let voxels = 0;
  for (let k = lo[2]; k < hi[2]; k++)
    for (let j = lo[1]; j < hi[1]; j++)
      for (let i = lo[0]; i < hi[0]; i++, voxels++) data[i + dims[0] * (j + dims[1] * k)] = 1;
  return { data, voxels };
}

interface LesionJson { voxelCount: number; volumeMl: number }
const lesionsOf = (json: unknown) => (json as { lesions: LesionJson[] }).lesions;
const VOXEL_ML = (SPACING[0] * SPACING[1] * SPACING[2]) / 1000;

/** Exit 0 must report exactly `n` lesions of `voxels` voxels in all (analytic: the mask as written). */
function expectLesions(n: number, voxels: number) {
  return (json: unknown): string | null => {
    const lesions = lesionsOf(json);
    if (lesions.length !== n) return `${lesions.length} lesions, expected ${n}`;
    const total = lesions.reduce((a, l) => a + l.voxelCount, 0);
    if (total !== voxels) return `${total} lesion voxels, expected ${voxels}`;
    const ml = lesions.reduce((a, l) => a + l.volumeMl, 0);
    if (Math.abs(ml - voxels * VOXEL_ML) > 0.001 * n + 1e-6) return `${ml} mL of lesion, expected ${voxels * VOXEL_ML}`;
    return null;
  };
}

/** Followup exit 0: every visit present and, when given, the matched track count. */
function expectFollowup(visits: number, tracks?: number) {
  return (json: unknown): string | null => {
    const j = json as { visits: unknown[]; tracks?: unknown[] };
    if (j.visits.length !== visits) return `${j.visits.length} visits, expected ${visits}`;
    if (tracks !== undefined && j.tracks !== undefined && j.tracks.length !== tracks) return `${j.tracks.length} tracks, expected ${tracks}`;
    return null;
  };
}

/**
 * Writes every case of `size` under `dir` (emptied first) and returns them. `only` limits the
 * classes written (a bomb of each class is slow to build).
 */
export function writeCases(dir: string, size: Size, only: readonly CaseClass[] = CLASSES): AnalysisCase[] {
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  const dims = GRIDS[size];
  const budgetMs = size === 'bomb' ? BOMB_BUDGET_MS : CASE_BUDGET_MS;
  const affine = gridAffine(dims);
  const scan = writeNifti(join(dir, 'scan.nii.gz'), dims, scanData(dims), affine);
  const segments = writeNifti(join(dir, 'segments.nii.gz'), dims, segmentData(dims), affine);
  const cases: AnalysisCase[] = [];

  const analyze = (cls: CaseClass, name: string, lesions: Written, extra: Omit<AnalysisCase, 'cls' | 'name' | 'argv' | 'inputBytes' | 'budgetMs'>,
    opts: { scan?: Written; segments?: Written; args?: string[] } = {}) => {
    const s = opts.scan ?? scan, m = opts.segments ?? segments;
    cases.push({
      cls, name: `analyze ${name}`, budgetMs, ...extra,
      argv: ['analyze', '--scan', s.path, '--segments', m.path, '--lesions', lesions.path, '--json', ...(opts.args ?? [])],
      inputBytes: s.bytes + m.bytes + lesions.bytes,
    });
  };
  /** Two visits on the same scan and map, lesion masks `a` then `b` (and viable masks when given). */
  const followup = (cls: CaseClass, name: string, a: Written, b: Written, extra: Omit<AnalysisCase, 'cls' | 'name' | 'argv' | 'inputBytes' | 'budgetMs'>,
    opts: { args?: string[]; viable?: [Written, Written]; criteria?: string } = {}) => {
    const file = join(dir, `${name.replace(/[^a-z0-9]+/gi, '-')}.json`);
    const rel = (w: Written) => w.path.slice(dir.length + 1);
    const visit = (id: string, date: string, l: Written, v?: Written) =>
      ({ id, date, scan: rel(scan), segments: rel(segments), scheme: 'default', lesions: rel(l), ...(v ? { viable: rel(v) } : {}) });
    writeFileSync(file, JSON.stringify({
      patient: { id: 'FUZZ-1' },
      ...(opts.criteria ? { criteria: opts.criteria } : {}),
      visits: [visit('v1', '2026-01-05', a, opts.viable?.[0]), visit('v2', '2026-03-02', b, opts.viable?.[1])],
    }));
    cases.push({
      cls, name: `followup ${name}`, budgetMs, ...extra,
      argv: ['followup', file, '--json', ...(opts.args ?? [])],
      inputBytes: 2 * (scan.bytes + segments.bytes) + a.bytes + b.bytes + (opts.viable ? opts.viable[0].bytes + opts.viable[1].bytes : 0),
    });
  };
  const lesionFile = (name: string, data: Uint8Array, patch?: (v: DataView) => void, aff = affine) => writeNifti(join(dir, `${name}.nii.gz`), dims, data, aff, patch);

  if (only.includes('all-set')) {
    const all = lesionFile('all-set', new Uint8Array(voxelCount(dims)).fill(1));
    analyze('all-set', 'every voxel set', all, { allowed: [0, 3], checkResult: expectLesions(1, voxelCount(dims)) });
    followup('all-set', 'every voxel set twice', all, all, { allowed: [0, 3], checkResult: expectFollowup(2, 1) });
  }
  if (only.includes('lattice')) {
    const { data, count } = latticeData(dims);
    const lattice = lesionFile('lattice', data);
    // Above the default cap of 1000 it must be refused before matching; below it, counted exactly.
    const allowed: (0 | 3)[] = count > 1000 ? [3] : [0];
    analyze('lattice', `one voxel in eight (${count} lesions)`, lattice, { allowed, checkResult: expectLesions(count, count) });
    if (count <= 5000) analyze('lattice', `one voxel in eight (${count} lesions), --max-lesions 5000`, lattice, { allowed: [0], checkResult: expectLesions(count, count) }, { args: ['--max-lesions', '5000'] });
    followup('lattice', `one voxel in eight twice (${count} lesions)`, lattice, lattice, { allowed, checkResult: expectFollowup(2, count) });
  }
  if (only.includes('one-voxel')) {
    const want = size === 'small' ? 1500 : 3000;
    const a = oneVoxelData(dims, want, 1);
    const fa = lesionFile('one-voxel-a', a.data);
    const cap = ['--max-lesions', String(2 * want)];
    analyze('one-voxel', `${a.count} one-voxel lesions, default cap`, fa, { allowed: a.count > 1000 ? [3] : [0], checkResult: expectLesions(a.count, a.count) });
    analyze('one-voxel', `${a.count} one-voxel lesions, cap ${2 * want}`, fa, { allowed: [0], checkResult: expectLesions(a.count, a.count) }, { args: cap });
    // Two visits of 1000 lesions each, the default cap: matched across visits within the budget.
    const c = oneVoxelData(dims, 1000, 3), d = oneVoxelData(dims, 1000, 4);
    followup('one-voxel', `${c.count} then ${d.count} one-voxel lesions`, lesionFile('one-voxel-c', c.data), lesionFile('one-voxel-d', d.data), { allowed: [0], checkResult: expectFollowup(2) });
  }
  if (only.includes('scaling')) {
    const box = boxData(dims);
    const plain = lesionFile('box', box.data);
    const variants: [string, number, number][] = [['NaN slope', NaN, 0], ['NaN intercept', 1, NaN], ['infinite slope', Infinity, 0],
      ['slope 1e38', 1e38, 0], ['slope -1', -1, 0], ['slope 1e-38', 1e-38, 0], ['intercept -1e38', 1, -1e38]];
    for (const [label, slope, inter] of variants) {
      const tag = label.replace(/[^a-z0-9]+/gi, '-');
      const scaledScan = writeNifti(join(dir, `scan-${tag}.nii.gz`), dims, scanData(dims), affine, setScaling(slope, inter));
      analyze('scaling', `scan ${label}`, plain, { allowed: [0, 3], checkResult: expectLesions(1, box.voxels) }, { scan: scaledScan });
      const scaledMask = lesionFile(`box-${tag}`, box.data, setScaling(slope, inter));
      analyze('scaling', `lesion mask ${label}`, scaledMask, { allowed: [0, 3], checkResult: expectLesions(1, box.voxels) });
      const scaledMap = writeNifti(join(dir, `segments-${tag}.nii.gz`), dims, segmentData(dims), affine, setScaling(slope, inter));
      analyze('scaling', `segment map ${label}`, plain, { allowed: [0, 3], checkResult: expectLesions(1, box.voxels) }, { segments: scaledMap });
    }
  }
  if (only.includes('affine')) {
    const box = boxData(dims);
    const mirrored = gridAffine(dims, true);
    // Mirrored in x on every input: the same anatomy, the same lesion.
    const mScan = writeNifti(join(dir, 'scan-mirrored.nii.gz'), dims, scanData(dims), mirrored);
    const mMap = writeNifti(join(dir, 'segments-mirrored.nii.gz'), dims, segmentData(dims), mirrored);
    analyze('affine', 'every input mirrored in x', lesionFile('box-mirrored', box.data, undefined, mirrored), { allowed: [0], checkResult: expectLesions(1, box.voxels) }, { scan: mScan, segments: mMap });
    analyze('affine', 'lesion mask alone mirrored in x', lesionFile('box-mirrored', box.data, undefined, mirrored), { allowed: [0, 3], checkResult: expectLesions(1, box.voxels) });
    const broken: [string, (v: DataView) => void][] = [
      ['singular sform (zero column), no qform', (v) => { v.setInt16(QFORM_CODE, 0, true); for (const row of [0, 1, 2]) v.setFloat32(SROW_X + 16 * row, 0, true); }],
      ['all-zero sform and qform', (v) => { v.setInt16(QFORM_CODE, 0, true); for (let n = 0; n < 12; n++) v.setFloat32(SROW_X + 4 * n, 0, true); }],
      ['NaN in the sform, no qform', (v) => { v.setInt16(QFORM_CODE, 0, true); v.setFloat32(SROW_X + 4, NaN, true); }],
      ['rank-2 sform (two equal columns), no qform', (v) => { v.setInt16(QFORM_CODE, 0, true); v.setInt16(SFORM_CODE, 1, true); v.setFloat32(SROW_X, SPACING[0], true); v.setFloat32(SROW_X + 4, SPACING[0], true); v.setFloat32(SROW_X + 16, 0, true); v.setFloat32(SROW_X + 20, 0, true); }],
    ];
    for (const [label, patch] of broken) {
      const tag = label.replace(/[^a-z0-9]+/gi, '-');
      analyze('affine', `lesion mask: ${label}`, lesionFile(`box-${tag}`, box.data, patch), { allowed: [0, 3], checkResult: expectLesions(1, box.voxels) });
      const bScan = writeNifti(join(dir, `scan-${tag}.nii.gz`), dims, scanData(dims), affine, patch);
      analyze('affine', `scan: ${label}`, lesionFile('box', box.data), { allowed: [0, 3], checkResult: expectLesions(1, box.voxels) }, { scan: bScan });
    }
  }
  if (only.includes('no-overlap')) {
    const box = boxData(dims);
    const far = gridAffine(dims, false, 10_000);
    const farMap = writeNifti(join(dir, 'segments-far.nii.gz'), dims, segmentData(dims), far);
    analyze('no-overlap', 'segment map 10 m from the scan', lesionFile('box', box.data), { allowed: [3] }, { segments: farMap });
    analyze('no-overlap', 'lesion mask 10 m from the scan', lesionFile('box-far', box.data, undefined, far), { allowed: [3] });
  }
  if (only.includes('ring')) {
    // A solid disc of lesion in every slice with a viable rim two voxels thick at its edge: mRECIST
    // measures the viable part by the longest segment inside the rim, the tangent chord
    // 2·√(R² − r²) (analytic geometry). The rim's radius changes from slice to slice.
    const [nx, ny, nz] = dims;
    const disc = new Uint8Array(voxelCount(dims)), rim = new Uint8Array(voxelCount(dims));
    const R0 = Math.floor(Math.min(nx, ny) / 2) - 2;
    for (let k = 0; k < nz; k++) {
      const R = R0 - (k % 3);
      for (let j = 0; j < ny; j++)
        for (let i = 0; i < nx; i++) {
          const d = Math.hypot(i - (nx - 1) / 2, j - (ny - 1) / 2);
          if (d <= R) disc[i + nx * (j + ny * k)] = 1;
          if (d <= R && d > R - 2) rim[i + nx * (j + ny * k)] = 1;
        }
    }
    const lesion = lesionFile('disc', disc), viable = lesionFile('rim', rim);
    // The widest rim has radii R0 and R0 − 2 voxels; ends on voxel centres may fall short by about a voxel each.
    const chordMm = 2 * Math.sqrt(R0 * R0 - (R0 - 2) ** 2) * SPACING[0];
    const check = (json: unknown): string | null => {
      const wrong = expectFollowup(2, 1)(json);
      if (wrong) return wrong;
      const targets = (json as { visits: { response: { targets: { recordedMm: number }[] } }[] }).visits[0].response.targets;
      if (targets.length !== 1) return `${targets.length} targets, expected 1`;
      const got = targets[0].recordedMm;
      return Math.abs(got - chordMm) <= 2 * SPACING[0] ? null : `viable diameter ${got} mm, expected the tangent chord ${chordMm.toFixed(1)} mm`;
    };
    followup('ring', `viable rim of radius ${R0} voxels, ${nz} slices`, lesion, lesion, { allowed: [0, 3], checkResult: check },
      { viable: [viable, viable], criteria: 'mRECIST' });
  }
  return cases;
}

let runs = 0;

/** Runs `falciform argv` under /usr/bin/time -v; a run past WALL_FACTOR times its budget is killed. */
export function runCli(cli: string, c: AnalysisCase): Promise<CliRun> {
  return new Promise((resolve, reject) => {
    const stats = join(tmpdir(), `falciform-fuzz-${process.pid}-${++runs}.time`);
    const child = spawn('/usr/bin/time', ['-v', '-o', stats, process.execPath, cli, ...c.argv], { stdio: ['ignore', 'pipe', 'pipe'] });
    const out: Buffer[] = [], err: Buffer[] = [];
    child.stdout.on('data', (b: Buffer) => out.push(b));
    child.stderr.on('data', (b: Buffer) => err.push(b));
    const t0 = performance.now();
    const timer = setTimeout(() => child.kill('SIGKILL'), WALL_FACTOR * c.budgetMs);
    child.on('error', reject);
    child.on('close', (status) => {
      clearTimeout(timer);
      const seconds = (performance.now() - t0) / 1000;
      let peakRssBytes = 0, cpuSeconds = seconds;
      try {
        const text = readFileSync(stats, 'utf8');
        const figure = (label: string) => Number(new RegExp(`${label}: ([0-9.]+)`).exec(text)?.[1] ?? NaN);
        peakRssBytes = figure('Maximum resident set size \\(kbytes\\)') * 1024;
        cpuSeconds = figure('User time \\(seconds\\)') + figure('System time \\(seconds\\)');
      } catch { /* killed before time wrote its figures */ }
      rmSync(stats, { force: true });
      resolve({ status, seconds, cpuSeconds, peakRssBytes, stdout: Buffer.concat(out).toString(), stderr: Buffer.concat(err).toString() });
    });
  });
}

/** Null when the run keeps the rule, else what broke it. `restingRssBytes`: the CLI's own footprint. */
export function judge(c: AnalysisCase, r: CliRun, restingRssBytes: number): string | null {
  if (r.cpuSeconds * 1000 > c.budgetMs) return `took ${r.cpuSeconds.toFixed(2)} s of CPU, budget ${c.budgetMs / 1000} s`;
  if (r.seconds * 1000 > WALL_FACTOR * c.budgetMs) return `took ${r.seconds.toFixed(2)} s of wall time, over ${WALL_FACTOR}× the budget`;
  const aim = memoryAim(c, restingRssBytes);
  if (r.peakRssBytes > aim) return `peak RSS ${mib(r.peakRssBytes)} MiB above the aim of ${mib(aim)} MiB`;
  if (r.status !== 0 && r.status !== 3) return `exit ${r.status}: ${r.stderr.slice(0, 300)}`;
  if (!c.allowed.includes(r.status)) return `exit ${r.status}, expected ${c.allowed.join(' or ')}${r.status === 0 ? '' : `: ${r.stderr.trim()}`}`;
  if (r.status === 3) {
    const lines = r.stderr.trimEnd().split('\n');
    if (lines.length !== 1 || lines[0].length > 500) return `exit 3 with ${lines.length} stderr lines of up to ${Math.max(...lines.map((l) => l.length))} characters`;
    return null;
  }
  let json: unknown;
  try {
    json = JSON.parse(r.stdout);
  } catch {
    return 'exit 0 without JSON on stdout';
  }
  return c.checkResult ? c.checkResult(json) : null;
}

/** Peak RSS allowed for a case: the CLI at rest, its working set and 1.5× the decompressed inputs. */
export const memoryAim = (c: AnalysisCase, restingRssBytes: number) => restingRssBytes + WORKING_SET_BYTES + MEMORY_RATIO * c.inputBytes;

export const mib = (b: number) => (b / 1024 ** 2).toFixed(b < 10 * 1024 ** 2 ? 2 : 0);

/** Peak RSS of the CLI doing nothing heavy (a usage error after loading every command). */
export async function restingRss(cli: string): Promise<number> {
  const r = await runCli(cli, { cls: 'all-set', name: 'resting', argv: ['analyze'], inputBytes: 0, budgetMs: 10_000, allowed: [] });
  return r.peakRssBytes;
}
