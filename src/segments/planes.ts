import type { Vec3 } from '../geometry/mat4.js';
import { cross, dot, norm, normalise, sub } from '../geometry/vec3.js';
import type { LandmarkSet } from './landmarks.js';

/** A plane with unit normal; `signedDistance` is positive on the normal's side. */
export interface Plane {
  readonly normal: Vec3;
  readonly point: Vec3;
}

/**
 * The planes of the landmark rule (brief, plane method). Each vertical plane holds both IVC points and
 * one vein point; its normal points to the side of the more lateral section, found from the landmarks
 * themselves: the right-hepatic-vein plane faces away from the middle hepatic vein, the
 * middle-hepatic-vein plane away from the umbilical fissure, and the umbilical-fissure plane towards
 * the middle hepatic vein. So a positive distance means "right of" without asking which way +x points:
 * the right-hepatic-vein plane is nearly coronal, and a sign taken from its normal's x component flips
 * under a small rotation. The portal plane passes through the portal bifurcation with normal along the
 * IVC axis from inferior to superior, so a positive distance means "above". The II/III plane is the
 * same through the umbilical part of the left portal vein when that point is given, else the portal plane.
 */
export interface LandmarkPlanes {
  readonly rightHepatic: Plane;
  readonly middleHepatic: Plane;
  readonly umbilical: Plane;
  readonly portal: Plane;
  /** Divides II (above) from III (below) in the left lateral section. */
  readonly leftLateral: Plane;
}

export function signedDistance(plane: Plane, p: Vec3): number {
  return dot(plane.normal, sub(p, plane.point));
}

/** Unit axis of the IVC, inferior to superior. */
export function ivcAxis(set: LandmarkSet): Vec3 {
  return normalise(sub(set.points.ivc_superior, set.points.ivc_inferior));
}

/** Vertical plane through the IVC axis and a vein point, its normal towards `towards` (away from it when `sign` is −1). */
export function veinPlane(set: LandmarkSet, vein: Vec3, towards: Vec3, sign: 1 | -1): Plane {
  const inf = set.points.ivc_inferior;
  const n = cross(sub(set.points.ivc_superior, inf), sub(vein, inf));
  const len = norm(n);
  const side = dot(n, sub(towards, inf)) * sign;
  const s = side < 0 ? -1 / len : 1 / len;
  return { normal: [n[0] * s, n[1] * s, n[2] * s], point: inf };
}

export function landmarkPlanes(set: LandmarkSet): LandmarkPlanes {
  const p = set.points;
  const portal: Plane = { normal: ivcAxis(set), point: p.portal_bifurcation };
  return {
    rightHepatic: veinPlane(set, p.right_hepatic_vein, p.middle_hepatic_vein, -1),
    middleHepatic: veinPlane(set, p.middle_hepatic_vein, p.umbilical_fissure, -1),
    umbilical: veinPlane(set, p.umbilical_fissure, p.middle_hepatic_vein, 1),
    portal,
    leftLateral: p.left_portal_umbilical ? { normal: portal.normal, point: p.left_portal_umbilical } : portal,
  };
}
