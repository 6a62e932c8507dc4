import { badInput } from '../errors.js';
import type { Vec3 } from '../geometry/mat4.js';
import { measureMaskLesion } from '../lesions/measures.js';
import type { Lesion } from '../lesions/lesion.js';
import { resampleNearest } from '../volume/resample.js';
import { makeVolume, type Volume } from '../volume/volume.js';
import { growBox, voxelsForMm, type Box } from './box.js';
import { seedComponent } from './flood.js';
import { cutThinBridges, fillHoles } from './morphology.js';
import { ballStats } from './seed-stats.js';
import { diffuse } from './smooth.js';
import { cropValues, physicalValues, seedVoxels } from './voxels.js';

export interface LesionParams {
  /** Size limit: no voxel farther than this from the click joins the lesion. */
  maxRadiusMm: number;
  /** Anisotropic diffusion steps before thresholding. */
  smoothingSteps: number;
  /** Radius of the ball around the click whose median is the lesion's value. */
  seedBallMm: number;
  /** The liver's value is the median of liver voxels between this distance and maxRadiusMm from the click. */
  liverShellFromMm: number;
  /** Opening radius that cuts thin leaks into vessels or a neighbouring lesion. */
  openingMm: number;
}

export const LESION_DEFAULTS: LesionParams = {
  maxRadiusMm: 40,
  smoothingSteps: 2,
  seedBallMm: 2,
  liverShellFromMm: 25,
  openingMm: 1.5,
};

export interface LesionRequest {
  scan: Volume;
  /** Liver mask (any grid; read at the scan's voxels). */
  liver: Volume;
  seedMm: Vec3;
  params?: Partial<LesionParams>;
  id?: string;
}

export interface LesionResult {
  /** 0/1 mask on the scan's grid. */
  mask: Volume;
  lesion: Lesion;
  kind: 'hypodense' | 'hyperdense';
  /** Value at the click (smoothed), of the liver around it, and the threshold between them. */
  lesionValue: number;
  liverValue: number;
  threshold: number;
  /** True when the region reached the size limit and was cut there. */
  reachedLimit: boolean;
  params: LesionParams;
  warnings: string[];
}

/**
 * One lesion from a click inside the liver: within a ball of maxRadiusMm around the click, the scan
 * is smoothed, the lesion's value (median at the click) and the liver's (median of liver voxels in a
 * shell around it) are taken, and the region on the lesion's side of the midway threshold that the
 * click reaches inside the liver mask is grown (hypodense: below it; hyperdense: above it), thin
 * leaks cut, holes filled.
 */
export function growLesion(req: LesionRequest): LesionResult {
  const p: LesionParams = { ...LESION_DEFAULTS, ...req.params };
  const { scan } = req;
  const sp = scan.spacingMm;
  const [seed] = seedVoxels(scan, [req.seedMm], 'lesion click');
  const liverOnScan = resampleNearest(req.liver.data, req.liver, scan);
  if (liverOnScan[seed.index] * req.liver.slope + req.liver.inter === 0) {
    throw badInput('lesion click', 'lies outside the liver mask; click inside the liver');
  }
  const box = growBox({ i0: seed.ijk[0], j0: seed.ijk[1], k0: seed.ijk[2], bx: 1, by: 1, bz: 1 }, voxelsForMm(sp, p.maxRadiusMm + 2 * p.openingMm), scan.dims);
  const bdims = [box.bx, box.by, box.bz] as const;
  const values = physicalValues(scan, box);
  const liverBox = cropValues(liverOnScan, scan.dims, box, req.liver.slope, req.liver.inter);
  const liver = new Uint8Array(liverBox.length);
  for (let n = 0; n < liver.length; n++) liver[n] = liverBox[n] !== 0 ? 1 : 0;
  const local: [number, number, number] = [seed.ijk[0] - box.i0, seed.ijk[1] - box.j0, seed.ijk[2] - box.k0];
  const seedLocal = local[0] + box.bx * (local[1] + box.by * local[2]);
  const warnings: string[] = [];

  const inLimit = new Uint8Array(liver.length);
  const shell = new Uint8Array(liver.length);
  const r2 = p.maxRadiusMm ** 2, s2 = p.liverShellFromMm ** 2;
  let b = 0;
  for (let k = 0; k < box.bz; k++) {
    for (let j = 0; j < box.by; j++) {
      for (let i = 0; i < box.bx; i++, b++) {
        const d2 = ((i - local[0]) * sp[0]) ** 2 + ((j - local[1]) * sp[1]) ** 2 + ((k - local[2]) * sp[2]) ** 2;
        inLimit[b] = d2 <= r2 && liver[b] ? 1 : 0;
        shell[b] = d2 > s2 && d2 <= r2 && liver[b] ? 1 : 0;
      }
    }
  }
  const noise = ballStats(values, bdims, sp, [local], p.maxRadiusMm, shell).spread;
  diffuse(values, bdims, sp, p.smoothingSteps, Math.max(1, 2 * noise));
  const lesionValue = ballStats(values, bdims, sp, [local], p.seedBallMm, liver).median;
  const around = ballStats(values, bdims, sp, [local], p.maxRadiusMm, shell);
  if (around.count === 0) throw badInput('lesion click', `no liver lies between ${p.liverShellFromMm} and ${p.maxRadiusMm} mm of the click to compare with`);
  const liverValue = around.median;
  const kind = lesionValue < liverValue ? 'hypodense' : 'hyperdense';
  const threshold = (lesionValue + liverValue) / 2;
  if (Math.abs(lesionValue - liverValue) < 2 * around.spread) {
    warnings.push(`the click's value (${lesionValue.toFixed(0)}) differs little from the liver around it (${liverValue.toFixed(0)}); check the outline`);
  }
  const candidate = new Uint8Array(liver.length);
  for (let n = 0; n < candidate.length; n++) {
    const v = values[n];
    candidate[n] = inLimit[n] && (kind === 'hypodense' ? v <= threshold : v >= threshold) ? 1 : 0;
  }
  if (candidate[seedLocal] === 0) throw badInput('lesion click', 'the value at the click is not on the lesion side of the threshold; click nearer the lesion centre');
  let region = seedComponent(candidate, bdims, [seedLocal], 6);
  region = cutThinBridges(region, bdims, sp, p.openingMm, (opened) => (opened[seedLocal] ? seedComponent(opened, bdims, [seedLocal], 6) : region));
  region = fillHoles(region, bdims);
  let reachedLimit = false;
  for (let n = 0; n < region.length && !reachedLimit; n++) if (region[n] && liver[n] && !inLimit[n]) reachedLimit = true;
  for (let n = 0; n < region.length; n++) region[n] &= inLimit[n];
  reachedLimit ||= touchesLimit(region, bdims, sp, local, p.maxRadiusMm);
  if (reachedLimit) warnings.push(`the region reached the ${p.maxRadiusMm} mm size limit and was cut there; check the outline`);

  const full = new Uint8Array(scan.data.length);
  const voxels = pasteBox(region, box, scan.dims, full);
  const mask = makeVolume(scan.dims, full, scan.affine, 'uint8');
  const lesion = measureMaskLesion(req.id ?? 'L1', mask, { storedValue: 1, label: 1, voxels }, scan);
  return { mask, lesion, kind, lesionValue, liverValue, threshold, reachedLimit, params: p, warnings };
}

/** True when a region voxel lies within one voxel of the limit sphere. */
function touchesLimit(region: Uint8Array, dims: readonly number[], sp: readonly number[], c: readonly number[], r: number): boolean {
  const inner = (r - Math.max(...sp)) ** 2;
  let b = 0;
  for (let k = 0; k < dims[2]; k++) {
    for (let j = 0; j < dims[1]; j++) {
      for (let i = 0; i < dims[0]; i++, b++) {
        if (region[b] && ((i - c[0]) * sp[0]) ** 2 + ((j - c[1]) * sp[1]) ** 2 + ((k - c[2]) * sp[2]) ** 2 > inner) return true;
      }
    }
  }
  return false;
}

/** Writes a box-order mask into the grid and returns the set voxels' grid indices, ascending. */
function pasteBox(region: Uint8Array, box: Box, dims: readonly number[], out: Uint8Array): Uint32Array {
  const [nx, ny] = dims;
  let count = 0;
  for (let n = 0; n < region.length; n++) count += region[n];
  const voxels = new Uint32Array(count);
  let b = 0, t = 0;
  for (let k = 0; k < box.bz; k++) {
    for (let j = 0; j < box.by; j++) {
      const row = box.i0 + nx * (box.j0 + j + ny * (box.k0 + k));
      for (let i = 0; i < box.bx; i++, b++) {
        if (region[b]) {
          out[row + i] = 1;
          voxels[t++] = row + i;
        }
      }
    }
  }
  return voxels;
}
