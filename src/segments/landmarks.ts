import type { Vec3 } from '../geometry/mat4.js';
import { badLandmarks } from '../errors.js';
import { cross, norm, sub } from '../geometry/vec3.js';
import { describeJsonValue, isJsonObject, parseJsonFile } from '../json-file.js';
import { ivcAxis, landmarkPlanes, signedDistance } from './planes.js';

/** The six points of a landmark set (world RAS mm), as named in the landmark-set file. */
export const LANDMARK_NAMES = [
  'ivc_superior',
  'ivc_inferior',
  'right_hepatic_vein',
  'middle_hepatic_vein',
  'umbilical_fissure',
  'portal_bifurcation',
] as const;
export type LandmarkName = (typeof LANDMARK_NAMES)[number];

/**
 * Optional seventh point: the umbilical part of the left portal vein. When given, it sets the plane
 * dividing II from III in the left lateral section; without it II/III come from the main portal plane.
 */
export const OPTIONAL_LANDMARK = 'left_portal_umbilical';

export interface LandmarkSet {
  points: Record<LandmarkName, Vec3> & { left_portal_umbilical?: Vec3 };
}

/** Closer IVC points than this give an axis whose direction a 1-mm placement error tilts by over 5°. */
export const MIN_IVC_SEPARATION_MM = 10;
/** A vein point nearer the IVC axis than this leaves its plane's orientation to placement noise. */
export const MIN_VEIN_AXIS_DISTANCE_MM = 5;

/** Reads a landmark-set file: `{"space": "RAS", "units": "mm", "points": {name: [x, y, z], …}}`. */
export function parseLandmarks(text: string, file: string): LandmarkSet {
  return landmarkSetFromJson(parseJsonFile(text, file, badLandmarks), file);
}

/** Validates one landmark-set object (also used for each entry of a reference file). */
export function landmarkSetFromJson(json: unknown, file: string, where = ''): LandmarkSet {
  const at = where ? `${where}: ` : '';
  if (!isJsonObject(json)) throw badLandmarks(file, `${at}expected a landmark-set object`);
  // Points in LPS (the DICOM convention) would mirror the map left to right: refuse anything but RAS mm.
  if (json.space !== undefined && json.space !== 'RAS') {
    throw badLandmarks(file, `${at}space is ${describeJsonValue(json.space)}; landmark points must be in RAS (convert LPS by negating x and y)`);
  }
  if (json.units !== undefined && json.units !== 'mm') throw badLandmarks(file, `${at}units is ${describeJsonValue(json.units)}; expected "mm"`);
  const src = json.points;
  if (!isJsonObject(src)) throw badLandmarks(file, `${at}expected an object "points"`);
  const problems: string[] = [];
  const points = {} as Record<LandmarkName, Vec3>;
  for (const name of LANDMARK_NAMES) {
    const p = src[name];
    if (p === undefined) problems.push(`${name} is missing`);
    else if (!Array.isArray(p) || p.length !== 3 || !p.every((x) => typeof x === 'number')) {
      problems.push(`${name} must be [x, y, z] in mm`);
    } else points[name] = [p[0], p[1], p[2]];
  }
  const extra = src[OPTIONAL_LANDMARK];
  if (extra !== undefined) {
    if (!Array.isArray(extra) || extra.length !== 3 || !extra.every((x) => typeof x === 'number')) problems.push(`${OPTIONAL_LANDMARK} must be [x, y, z] in mm`);
    else (points as LandmarkSet['points']).left_portal_umbilical = [extra[0], extra[1], extra[2]];
  }
  if (problems.length > 0) throw badLandmarks(file, at + problems.join('; '));
  return { points };
}

/**
 * Checks that the plane rule can be applied to a set: all six points present and finite, the IVC
 * points far enough apart with ivc_superior above ivc_inferior, every vein point off the IVC axis
 * (else its plane is undefined) and the vein points in right-to-left order (right hepatic vein,
 * middle hepatic vein, umbilical fissure), each one on the expected side of its neighbours' planes.
 * Throws one bad-landmarks error listing every problem found.
 */
export function checkLandmarks(set: LandmarkSet, file: string): void {
  const problems: string[] = [];
  const pts = set.points as Partial<Record<LandmarkName, Vec3>>;
  for (const name of LANDMARK_NAMES) {
    const p = pts[name];
    if (p === undefined) problems.push(`${name} is missing`);
    else if (p.length !== 3 || !p.every((x) => Number.isFinite(x))) problems.push(`${name} must be three finite numbers`);
  }
  if (problems.length > 0) throw badLandmarks(file, problems.join('; '));

  const p = set.points;
  const axis = sub(p.ivc_superior, p.ivc_inferior);
  const ivcLength = norm(axis);
  if (ivcLength < MIN_IVC_SEPARATION_MM) {
    problems.push(
      `ivc_superior and ivc_inferior are ${ivcLength.toFixed(1)} mm apart; they must be at least ${MIN_IVC_SEPARATION_MM} mm apart to define the IVC axis`,
    );
    throw badLandmarks(file, problems.join('; '));
  }
  if (axis[2] <= 0) problems.push('ivc_superior is not above ivc_inferior (swapped IVC points?)');

  const unit = ivcAxis(set);
  const veins = ['right_hepatic_vein', 'middle_hepatic_vein', 'umbilical_fissure'] as const;
  let planesOk = true;
  for (const v of veins) {
    const off = sub(p[v], p.ivc_inferior);
    const fromAxis = norm(cross(unit, off));
    if (fromAxis < MIN_VEIN_AXIS_DISTANCE_MM) {
      problems.push(
        `${v} is ${fromAxis.toFixed(1)} mm from the IVC axis; its plane is undefined (needs at least ${MIN_VEIN_AXIS_DISTANCE_MM} mm)`,
      );
      planesOk = false;
    }
  }
  if (planesOk) {
    // Each vein plane faces away from its medial neighbour (planes.ts); the order then needs checking
    // only where that does not already fix it, and the one tie to the patient's right (+x, nifti1.h)
    // is the umbilical-fissure plane, which is far from coronal, so a tilt of the set cannot flip it.
    const planes = landmarkPlanes(set);
    const wrong: string[] = [];
    if (!(signedDistance(planes.middleHepatic, p.right_hepatic_vein) > 0)) wrong.push('right_hepatic_vein is not right of the middle_hepatic_vein plane');
    if (!(signedDistance(planes.rightHepatic, p.umbilical_fissure) < 0)) wrong.push('umbilical_fissure is not left of the right_hepatic_vein plane');
    if (!(signedDistance(planes.umbilical, p.right_hepatic_vein) > 0)) wrong.push('right_hepatic_vein is not right of the umbilical_fissure plane');
    if (!(planes.umbilical.normal[0] > 0)) wrong.push('the umbilical_fissure plane has the middle hepatic vein on the patient\'s left');
    if (wrong.length > 0) {
      problems.push(
        wrong.join(', ') +
          ' (expected right_hepatic_vein, middle_hepatic_vein, umbilical_fissure from the patient\'s right to left, RAS: right is +x)',
      );
    }
  }
  if (problems.length > 0) throw badLandmarks(file, problems.join('; '));
}
