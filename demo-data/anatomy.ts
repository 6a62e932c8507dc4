/**
 * A coarse, CT-like abdomen in the body frame (RAS mm, +x towards the patient's right): air, a fat
 * shell, soft tissue, spine, a two-lobed liver with IVC, hepatic and portal veins, and lesions.
 * Values are Hounsfield units as commonly seen on portal-venous CT (common practice, from memory).
 */
import type { Vec3 } from '../src/geometry/mat4.js';

export const HU = { air: -1000, fat: -100, soft: 45, bone: 450, ivc: 150, vein: 165, ablation: 35 } as const;

/** Vessel landmarks of the body frame; the segment planes of the demo follow from them. */
export const BODY_LANDMARKS = {
  ivc_superior: [10, -35, 55] as Vec3,
  ivc_inferior: [10, -35, -40] as Vec3,
  right_hepatic_vein: [80, 5, 45] as Vec3,
  middle_hepatic_vein: [5, 45, 42] as Vec3,
  umbilical_fissure: [-60, 45, 22] as Vec3,
  portal_bifurcation: [20, -5, 0] as Vec3,
};

const IVC_XY = [10, -35] as const;

function inEllipsoid(p: Vec3, c: Vec3, r: Vec3): boolean {
  const x = (p[0] - c[0]) / r[0], y = (p[1] - c[1]) / r[1], z = (p[2] - c[2]) / r[2];
  return x * x + y * y + z * z <= 1;
}

function nearSegment(p: Vec3, a: Vec3, b: Vec3, radius: number): boolean {
  const d = [b[0] - a[0], b[1] - a[1], b[2] - a[2]];
  const t = Math.max(0, Math.min(1, ((p[0] - a[0]) * d[0] + (p[1] - a[1]) * d[1] + (p[2] - a[2]) * d[2]) / (d[0] ** 2 + d[1] ** 2 + d[2] ** 2)));
  return Math.hypot(p[0] - a[0] - t * d[0], p[1] - a[1] - t * d[1], p[2] - a[2] - t * d[2]) <= radius;
}

export function inBody(p: Vec3): 'air' | 'fat' | 'inside' {
  const x = p[0] / 172, y = (p[1] + 10) / 122;
  if (x * x + y * y > 1) return 'air';
  const xi = p[0] / 155, yi = (p[1] + 10) / 105;
  return xi * xi + yi * yi > 1 ? 'fat' : 'inside';
}

export function inSpine(p: Vec3): boolean {
  return Math.hypot(p[0], p[1] + 92) <= 19;
}

export function inIvc(p: Vec3): boolean {
  return Math.hypot(p[0] - IVC_XY[0], p[1] - IVC_XY[1]) <= 11;
}

/** Liver tissue (the IVC is not liver; the veins inside it are). */
export function inLiver(p: Vec3): boolean {
  if (inBody(p) !== 'inside' || inIvc(p)) return false;
  return inEllipsoid(p, [30, 0, 5], [88, 72, 64]) || inEllipsoid(p, [-50, 25, 15], [55, 40, 32]);
}

/** The caudate lobe (segment I): liver beside the IVC, to its left and front. */
export function inCaudate(p: Vec3): boolean {
  return inLiver(p) && inEllipsoid(p, [-5, -30, 10], [18, 13, 24]);
}

const top: Vec3 = [IVC_XY[0], IVC_XY[1], 50];
const veins: [Vec3, Vec3, number][] = [
  [top, [95, 14, 40], 4.5],
  [top, [2, 70, 36], 4],
  [top, [-75, 62, 18], 3.5],
  [BODY_LANDMARKS.portal_bifurcation, [75, 0, -4], 5],
  [BODY_LANDMARKS.portal_bifurcation, [-40, 35, 8], 4.5],
  [BODY_LANDMARKS.portal_bifurcation, [15, -20, -70], 6],
];

export function inVein(p: Vec3): boolean {
  return veins.some(([a, b, r]) => nearSegment(p, a, b, r));
}

/** A lesion: ellipsoid with semi-axes (d/2, 0.8·d/2, 0.9·d/2) along the body axes. */
export function inLesion(p: Vec3, centre: Vec3, diameterMm: number): boolean {
  if (diameterMm <= 0) return false;
  const r = diameterMm / 2;
  return inEllipsoid(p, centre, [r, 0.8 * r, 0.9 * r]);
}
