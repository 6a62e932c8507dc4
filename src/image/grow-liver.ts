import { badInput } from '../errors.js';
import type { Vec3 } from '../geometry/mat4.js';
import { makeVolume, voxelVolumeMl, type Volume } from '../volume/volume.js';
import { competingGrowth, seedComponent, windowMask } from './flood.js';
import { close, cutThinBridges, fillHoles } from './morphology.js';
import { ballStats } from './seed-stats.js';
import { diffuse } from './smooth.js';
import { physicalValues, seedVoxels } from './voxels.js';

/** The liver grower's settings; every one has a default and all are returned with the result. */
export interface LiverParams {
  /** Radius of the ball around each seed whose values set the window and the noise level. */
  neighbourhoodMm: number;
  /** Anisotropic diffusion steps before thresholding. */
  smoothingSteps: number;
  /** Diffusion conductance κ in scan units; null: twice the noise level found at the seeds. */
  conductance: number | null;
  /** Window half-width in noise levels (of the smoothed scan at the seeds)… */
  windowSpread: number;
  /** …but never narrower than this (scan units), for very quiet scans. */
  minHalfWidth: number;
  /** Explicit window [low, high] in scan units; null: from the seeds' neighbourhood. */
  window: [number, number] | null;
  /** Opening radius: necks to neighbouring organs thinner than twice this are cut. */
  openingMm: number;
  /** Closing radius: notches (vessels at the surface) narrower than twice this are closed. */
  closingMm: number;
  /** Fill enclosed holes (vessels and lesions inside the liver). */
  fillHoles: boolean;
}

export const LIVER_DEFAULTS: LiverParams = {
  neighbourhoodMm: 8,
  smoothingSteps: 3,
  conductance: null,
  windowSpread: 3,
  minHalfWidth: 15,
  window: null,
  openingMm: 5,
  closingMm: 4,
  fillHoles: true,
};

export interface GrowProgress {
  (fraction: number, step: string): void;
}

export interface LiverRequest {
  scan: Volume;
  /** Seed points inside the liver, world RAS mm (at least one). */
  seedsMm: readonly Vec3[];
  /** Points known not to be liver (a neighbouring organ the liver still joins). */
  notLiverMm?: readonly Vec3[];
  params?: Partial<LiverParams>;
  onProgress?: GrowProgress;
}

export interface LiverResult {
  /** 0/1 mask on the scan's grid. */
  mask: Volume;
  /** The settings used, with the window and conductance as found. */
  params: LiverParams & { window: [number, number]; conductance: number };
  voxelCount: number;
  volumeMl: number;
  /** Noise level (robust standard deviation) of the scan at the seeds, before smoothing. */
  noiseLevel: number;
  warnings: string[];
}

/**
 * Liver mask from seed points by classical seeded growing: edge-preserving smoothing, an intensity
 * window from the seeds' neighbourhood, the seeds' 6-connected region in it, an opening in mm that
 * cuts thin bridges to neighbouring organs of similar density, then closing and hole filling so
 * vessels and lesions inside the liver stay in the mask.
 */
export function growLiver(req: LiverRequest): LiverResult {
  const { scan } = req;
  const p: LiverParams = { ...LIVER_DEFAULTS, ...req.params };
  const report = req.onProgress ?? (() => undefined);
  const dims = scan.dims;
  const sp = scan.spacingMm;
  const warnings: string[] = [];
  if (req.seedsMm.length === 0) throw badInput('liver seed', 'give at least one point inside the liver');
  const seeds = seedVoxels(scan, req.seedsMm, 'liver seed');
  const rejects = seedVoxels(scan, req.notLiverMm ?? [], '"not liver" point');

  report(0, 'reading the scan');
  const values = physicalValues(scan);
  const raw = ballStats(values, dims, sp, seeds.map((s) => s.ijk), p.neighbourhoodMm);
  const noiseLevel = raw.spread;
  const conductance = p.conductance ?? Math.max(1, 2 * noiseLevel);
  report(0.1, 'smoothing');
  diffuse(values, dims, sp, p.smoothingSteps, conductance);

  report(0.4, 'thresholding');
  let window = p.window;
  if (window === null) {
    const smooth = ballStats(values, dims, sp, seeds.map((s) => s.ijk), p.neighbourhoodMm);
    const half = Math.max(p.windowSpread * smooth.spread, p.minHalfWidth);
    window = [smooth.median - half, smooth.median + half];
  }
  const seedIdx = seeds.map((s) => s.index);
  const region = seedComponent(windowMask(values, window[0], window[1]), dims, seedIdx, 6);
  if (seedIdx.every((s) => region[s] === 0)) {
    throw badInput('liver seed', `the scan value at the seed lies outside the window ${window[0].toFixed(0)}–${window[1].toFixed(0)}; place the seed in plain liver tissue`);
  }

  report(0.5, 'cutting thin bridges');
  const rejectIdx = rejects.map((s) => s.index);
  let liver = cutThinBridges(region, dims, sp, p.openingMm, (opened) => {
    const kept = rejectIdx.length > 0 ? competingGrowth(opened, dims, seedIdx, rejectIdx) : seedComponent(opened, dims, seedIdx, 6);
    if (seedIdx.every((s) => kept[s] === 0)) {
      warnings.push(`every seed lies in a part of the liver thinner than the ${2 * p.openingMm} mm opening; the opening was skipped`);
      return rejectIdx.length > 0 ? competingGrowth(region, dims, seedIdx, rejectIdx) : region;
    }
    return kept;
  });
  if (rejectIdx.length > 0) {
    // The reconstruction may reach back across the cut; keep only what the seeds reach first.
    liver = competingGrowth(liver, dims, seedIdx, rejectIdx);
  }

  report(0.75, 'closing');
  if (p.closingMm > 0) liver = close(liver, dims, sp, p.closingMm);
  report(0.9, 'filling holes');
  if (p.fillHoles) liver = fillHoles(liver, dims);

  let count = 0;
  for (let n = 0; n < liver.length; n++) count += liver[n];
  report(1, 'done');
  return {
    mask: makeVolume(dims, liver, scan.affine, 'uint8'),
    params: { ...p, window: [window[0], window[1]], conductance },
    voxelCount: count,
    volumeMl: count * voxelVolumeMl(scan),
    noiseLevel,
    warnings,
  };
}
