import type { Vec3 } from '../geometry/mat4.js';
import { cross, dot, norm, normalise, sub } from '../geometry/vec3.js';
import type { LandmarkSet } from './landmarks.js';

/** A plane with unit normal; `signedDistance` is positive on the normal's side. */
export interface Plane {
  readonly normal: Vec3;
  readonly point: Vec3;
}

/**
 * The four planes of the landmark rule (brief, plane method). Each vertical plane holds both IVC
 * points and one vein point, its normal towards the patient's right (+x in RAS, nifti1.h: +x = Right), so a positive
 * distance means "right of". The portal plane passes through the portal bifurcation with normal
 * along the IVC axis from inferior to superior, so a positive distance means "above".
 */
export interface LandmarkPlanes {
  readonly rightHepatic: Plane;
  readonly middleHepatic: Plane;
  readonly umbilical: Plane;
  readonly portal: Plane;
}

export function signedDistance(plane: Plane, p: Vec3): number {
  return dot(plane.normal, sub(p, plane.point));
}

/** Unit axis of the IVC, inferior to superior. */
export function ivcAxis(set: LandmarkSet): Vec3 {
  return normalise(sub(set.points.ivc_superior, set.points.ivc_inferior));
}

/** Vertical plane through the IVC axis and a vein point, normal towards the patient's right. */
export function veinPlane(set: LandmarkSet, vein: Vec3): Plane {
  const inf = set.points.ivc_inferior;
  const n = cross(sub(set.points.ivc_superior, inf), sub(vein, inf));
  const len = norm(n);
  // Patient's right is +x in RAS (nifti1.h); a plane facing exactly forward has no right side (checkLandmarks refuses it).
  const s = n[0] < 0 ? -1 / len : 1 / len;
  return { normal: [n[0] * s, n[1] * s, n[2] * s], point: inf };
}

export function landmarkPlanes(set: LandmarkSet): LandmarkPlanes {
  const p = set.points;
  return {
    rightHepatic: veinPlane(set, p.right_hepatic_vein),
    middleHepatic: veinPlane(set, p.middle_hepatic_vein),
    umbilical: veinPlane(set, p.umbilical_fissure),
    portal: { normal: ivcAxis(set), point: p.portal_bifurcation },
  };
}
