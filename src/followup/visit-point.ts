import type { Vec3 } from '../geometry/mat4.js';
import { applyRigid, invertRigid, type RigidTransform } from '../geometry/rigid.js';

/**
 * A world point of one visit in another visit's world (both RAS mm): the follow-up aligns every
 * visit to the baseline, so the point goes into the baseline's space through its own visit's
 * alignment and back out through the inverse of the other's. This is how two visits are shown
 * side by side at the same anatomical place.
 */
export function pointInVisit(p: Vec3, fromToBaseline: RigidTransform, toToBaseline: RigidTransform): Vec3 {
  return applyRigid(invertRigid(toToBaseline), applyRigid(fromToBaseline, p));
}
