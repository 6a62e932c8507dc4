import type { Vec3 } from '../geometry/mat4.js';
import { dot, normalise } from '../geometry/vec3.js';
import { segmentAtWorld, type SegmentMap } from '../segments/segment-map.js';
import type { LesionResult } from '../visit/analyze.js';
import { axialAxis, valueAt, voxelIndexAtWorld, type Volume } from '../volume/volume.js';
import { segmentColour } from './palette.js';

/**
 * A key image of one lesion: the scan's axial slice through the lesion's centroid (the voxel plane
 * whose normal is closest to world S, as everywhere), cut square around it, shown as radiologists read
 * it (patient's right on the image's left, anterior up), in a CT soft-tissue window, with the segment
 * map's colour washed over the liver, the lesion's outline and its longest axial diameter drawn on top.
 * Every layer is sampled through world coordinates, so a map or mask on another grid lines up.
 */
export interface KeyImage {
  widthPx: number;
  heightPx: number;
  /** Field of view per pixel, mm. */
  mmPerPx: number;
  /** 8-bit RGB, rows top (anterior) to bottom. */
  rgb: Uint8Array;
  /** The longest diameter lies in this slice (else it is drawn dashed, projected onto it). */
  diameterInSlice: boolean;
}

/**
 * Soft-tissue window for CT, in Hounsfield units: width 400, level 50 (common practice for the
 * abdomen, from memory): -150 HU and below is black, 250 HU and above is white.
 */
export const SOFT_TISSUE_WINDOW = { widthHu: 400, levelHu: 50 } as const;
/** How strongly a segment's colour is laid over the grey, 0..1. */
export const WASH = 0.3;
export const OUTLINE_RGB = [255, 255, 255] as const;
/** The diameter line: a colour apart from the white outline and from every segment colour. */
export const DIAMETER_RGB = [255, 0, 255] as const;
export const KEY_IMAGE_PX = 112;
/** The field of view: 2.5 lesion diameters, at least 40 and at most 160 mm. */
export function fieldOfViewMm(longestAxialMm: number | null): number {
  return Math.min(160, Math.max(40, 2.5 * (longestAxialMm ?? 0)));
}

export function windowGrey(hu: number): number {
  const { widthHu, levelHu } = SOFT_TISSUE_WINDOW;
  const t = (hu - (levelHu - widthHu / 2)) / widthHu;
  return Math.round(255 * Math.min(1, Math.max(0, t)));
}

export function hexRgb(hex: string): [number, number, number] {
  const n = parseInt(hex.slice(1), 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}

/** The grey of a pixel with a segment's colour washed over it. */
export function washed(grey: number, colour: readonly number[]): [number, number, number] {
  return [0, 1, 2].map((c) => Math.round((1 - WASH) * grey + WASH * colour[c])) as [number, number, number];
}

/** The slice plane: its centre (the centroid moved onto the slice) and its screen axes in world mm. */
export function slicePlane(scan: Volume, centroidMm: Vec3): { centre: Vec3; right: Vec3; down: Vec3 } {
  const a = axialAxis(scan.affine);
  const m = scan.inverse;
  const c = [0, 1, 2].map((r) => m[4 * r] * centroidMm[0] + m[4 * r + 1] * centroidMm[1] + m[4 * r + 2] * centroidMm[2] + m[4 * r + 3]);
  c[a] = Math.round(c[a]);
  const A = scan.affine;
  const row = (r: number) => A[4 * r] * c[0] + A[4 * r + 1] * c[1] + A[4 * r + 2] * c[2] + A[4 * r + 3];
  const centre: Vec3 = [row(0), row(1), row(2)];
  const col = (k: number): Vec3 => normalise([A[k], A[4 + k], A[8 + k]]);
  const [p, q] = [0, 1, 2].filter((k) => k !== a).map(col);
  // The in-plane axis nearer world x runs across the image; the patient's right (+x) goes to the left.
  let [h, v] = Math.abs(p[0]) >= Math.abs(q[0]) ? [p, q] : [q, p];
  if (h[0] > 0) h = [-h[0], -h[1], -h[2]];
  // Anterior (+y) up: down the image is -y.
  if (v[1] > 0) v = [-v[0], -v[1], -v[2]];
  return { centre, right: h, down: v };
}

export function renderKeyImage(scan: Volume, segments: SegmentMap, lesionMask: Volume | undefined, lesion: LesionResult): KeyImage {
  const S = KEY_IMAGE_PX;
  const mmPerPx = fieldOfViewMm(lesion.longestAxialMm) / S;
  const { centre, right, down } = slicePlane(scan, lesion.centroidMm);
  const world = (x: number, y: number): Vec3 => {
    const u = (x - S / 2) * mmPerPx;
    const w = (y - S / 2) * mmPerPx;
    return [centre[0] + u * right[0] + w * down[0], centre[1] + u * right[1] + w * down[1], centre[2] + u * right[2] + w * down[2]];
  };
  const rgb = new Uint8Array(3 * S * S);
  const inLesion = new Uint8Array(S * S);
  const radius = (lesion.longestAxialMm ?? 0) / 2;
  for (let y = 0; y < S; y++) {
    for (let x = 0; x < S; x++) {
      const p = world(x + 0.5, y + 0.5);
      const n = voxelIndexAtWorld(scan, p);
      const grey = n < 0 ? 0 : windowGrey(valueAt(scan, n));
      const seg = segmentAtWorld(segments, p);
      const px = seg === null ? [grey, grey, grey] : washed(grey, hexRgb(segmentColour(seg)));
      rgb.set(px, 3 * (y * S + x));
      if (lesion.source === 'mask' && lesionMask) {
        const m = voxelIndexAtWorld(lesionMask, p);
        inLesion[y * S + x] = m >= 0 && valueAt(lesionMask, m) !== 0 ? 1 : 0;
      } else {
        // A manual mark is a centre and a diameter: its outline is that circle in the slice.
        const d = [p[0] - lesion.centroidMm[0], p[1] - lesion.centroidMm[1], p[2] - lesion.centroidMm[2]] as Vec3;
        inLesion[y * S + x] = Math.hypot(dot(d, right), dot(d, down)) <= radius ? 1 : 0;
      }
    }
  }
  // The outline: lesion pixels with a 4-neighbour outside the lesion (or at the image's edge).
  for (let y = 0; y < S; y++) {
    for (let x = 0; x < S; x++) {
      if (!inLesion[y * S + x]) continue;
      const edge = x === 0 || y === 0 || x === S - 1 || y === S - 1 ||
        !inLesion[y * S + x - 1] || !inLesion[y * S + x + 1] || !inLesion[(y - 1) * S + x] || !inLesion[(y + 1) * S + x];
      if (edge) rgb.set(OUTLINE_RGB, 3 * (y * S + x));
    }
  }
  let diameterInSlice = false;
  const ends = lesion.longestAxialEndpointsMm;
  if (ends) {
    const toPx = (e: Vec3): [number, number] => {
      const d: Vec3 = [e[0] - centre[0], e[1] - centre[1], e[2] - centre[2]];
      return [S / 2 + dot(d, right) / mmPerPx, S / 2 + dot(d, down) / mmPerPx];
    };
    const normal = normalise([right[1] * down[2] - right[2] * down[1], right[2] * down[0] - right[0] * down[2], right[0] * down[1] - right[1] * down[0]]);
    const off = Math.abs(dot([ends[0][0] - centre[0], ends[0][1] - centre[1], ends[0][2] - centre[2]], normal));
    diameterInSlice = off < 0.5 * Math.min(...scan.spacingMm);
    drawLine(rgb, S, toPx(ends[0]), toPx(ends[1]), diameterInSlice);
  }
  return { widthPx: S, heightPx: S, mmPerPx, rgb, diameterInSlice };
}

/** A one-pixel line between pixel-space points; dashed (3 on, 3 off) when asked. */
function drawLine(rgb: Uint8Array, S: number, a: [number, number], b: [number, number], solid: boolean): void {
  const steps = Math.max(1, Math.ceil(Math.max(Math.abs(b[0] - a[0]), Math.abs(b[1] - a[1]))));
  for (let i = 0; i <= steps; i++) {
    if (!solid && Math.floor(i / 3) % 2 === 1) continue;
    const x = Math.floor(a[0] + ((b[0] - a[0]) * i) / steps);
    const y = Math.floor(a[1] + ((b[1] - a[1]) * i) / steps);
    if (x >= 0 && y >= 0 && x < S && y < S) rgb.set(DIAMETER_RGB, 3 * (y * S + x));
  }
}
