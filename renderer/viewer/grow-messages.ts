import type { Vec3 } from '../../src/geometry/mat4';
import type { LesionParams } from '../../src/image/grow-lesion';
import type { LiverParams } from '../../src/image/grow-liver';

/** Grow a liver mask or a lesion on a stored visit's scan (renderer/workers/grow.worker.ts). */
export type GrowRequest =
  | { kind: 'liver'; patientId: string; visitId: string; seedMm: Vec3; params: Partial<LiverParams> }
  | { kind: 'lesion'; patientId: string; visitId: string; seedMm: Vec3; params: Partial<LesionParams> }
  /** One click (a path of one point) or one dragged stroke, painted as one change. */
  | { kind: 'brush'; patientId: string; visitId: string; pathMm: Vec3[]; role: 'liver' | 'lesions'; radiusMm: number; erase: boolean };

export interface GrownLiver {
  kind: 'liver';
  seedMm: Vec3;
  volumeMl: number;
  noiseLevel: number;
  params: LiverParams & { window: [number, number]; conductance: number };
  warnings: string[];
  /** The mask as .nii.gz on the scan's grid, ready to store. */
  bytes: Uint8Array;
  dims: number[];
  affine: number[];
}

export interface GrownLesion {
  kind: 'lesion';
  seedMm: Vec3;
  lesionKind: 'hypodense' | 'hyperdense';
  lesionValue: number;
  liverValue: number;
  threshold: number;
  volumeMl: number;
  longestAxialMm: number;
  shortAxisMm: number;
  endpointsMm: [Vec3, Vec3] | null;
  reachedLimit: boolean;
  params: LesionParams;
  warnings: string[];
  /** The visit's lesion mask with this lesion added, as .nii.gz on the scan's grid. */
  bytes: Uint8Array;
  dims: number[];
  affine: number[];
}

/** A brush dab or stroke on the stored liver or lesion mask, as .nii.gz bytes on that mask's grid. */
export interface BrushedMask {
  kind: 'brush';
  role: 'liver' | 'lesions';
  erase: boolean;
  pathMm: Vec3[];
  /** Balls painted along the path (`strokeDabs`). */
  dabs: number;
  radiusMm: number;
  changed: number;
  bytes: Uint8Array;
  dims: number[];
  affine: number[];
}

export type GrowResult = GrownLiver | GrownLesion | BrushedMask;
