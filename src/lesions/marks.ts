import { badFile } from '../errors.js';
import type { Vec3 } from '../geometry/mat4.js';
import { describeJsonValue, isJsonObject, parseJsonFile } from '../json-file.js';
import type { Lesion } from './lesion.js';

/** A lesion measured by hand: centre and calipers in world RAS mm (contracts, "Manual marks"). */
export interface Mark {
  id: string;
  centreMm: Vec3;
  longestAxialMm: number;
  shortAxisMm: number;
  /** Caliper ends of the longest axial diameter, when the file gives them. */
  endpointsMm: [Vec3, Vec3] | null;
  /** Longest diameter of the enhancing (viable) part, for mRECIST. */
  viableAxialMm?: number;
}

// Calipers placed by hand and a typed-in length may differ by rounding; more than this is a mistake.
const ENDPOINT_TOLERANCE_MM = 1;

/**
 * Reads a manual-marks file: `{"space": "RAS", "units": "mm", "marks": [{"id", "centreMm",
 * "longestAxialMm", "shortAxisMm", "endpointsMm"?, "viableAxialMm"?}]}`. `longestAxialMm` may be left
 * out when the endpoints are given. Throws a bad-file error naming the mark and the problem.
 */
export function parseMarks(text: string, file: string): Mark[] {
  const json = parseJsonFile(text, file);
  if (!isJsonObject(json)) throw badFile(file, 'a marks file must be a JSON object with a "marks" list');
  if (json.space !== undefined && json.space !== 'RAS') {
    throw badFile(file, `space is ${describeJsonValue(json.space)}; marks must be in world RAS coordinates ("RAS")`);
  }
  if (json.units !== undefined && json.units !== 'mm') {
    throw badFile(file, `units are ${describeJsonValue(json.units)}; marks must be in millimetres ("mm")`);
  }
  if (!Array.isArray(json.marks)) throw badFile(file, 'a marks file needs a list "marks"');
  const seen = new Set<string>();
  return json.marks.map((raw: unknown, n: number) => {
    const where = `mark ${n + 1}`;
    if (!isJsonObject(raw)) throw badFile(file, `${where} is not an object`);
    const id = raw.id;
    if (typeof id !== 'string' || id.trim() === '') throw badFile(file, `${where} needs a non-empty "id"`);
    const who = `mark "${id}"`;
    if (seen.has(id)) throw badFile(file, `${who} appears twice; mark ids must be unique`);
    seen.add(id);
    const centreMm = point(raw.centreMm, file, `${who}: centreMm`);
    let endpointsMm: [Vec3, Vec3] | null = null;
    if (raw.endpointsMm !== undefined && raw.endpointsMm !== null) {
      const e = raw.endpointsMm;
      if (!Array.isArray(e) || e.length !== 2) throw badFile(file, `${who}: endpointsMm must be two points [[x, y, z], [x, y, z]]`);
      endpointsMm = [point(e[0], file, `${who}: endpointsMm[0]`), point(e[1], file, `${who}: endpointsMm[1]`)];
    }
    const caliper = endpointsMm ? Math.hypot(...endpointsMm[0].map((v, c) => v - (endpointsMm as [Vec3, Vec3])[1][c])) : null;
    let longestAxialMm: number;
    if (raw.longestAxialMm === undefined && caliper !== null) longestAxialMm = caliper;
    else longestAxialMm = length(raw.longestAxialMm, file, `${who}: longestAxialMm`);
    const shortAxisMm = length(raw.shortAxisMm, file, `${who}: shortAxisMm`);
    if (shortAxisMm > longestAxialMm + 0.05) {
      throw badFile(file, `${who}: shortAxisMm ${shortAxisMm} is longer than longestAxialMm ${longestAxialMm}`);
    }
    if (caliper !== null && Math.abs(caliper - longestAxialMm) > ENDPOINT_TOLERANCE_MM) {
      throw badFile(file, `${who}: endpointsMm are ${caliper.toFixed(1)} mm apart but longestAxialMm is ${longestAxialMm}`);
    }
    const mark: Mark = { id, centreMm, longestAxialMm, shortAxisMm, endpointsMm };
    if (raw.viableAxialMm !== undefined && raw.viableAxialMm !== null) {
      const viable = length(raw.viableAxialMm, file, `${who}: viableAxialMm`);
      if (viable > longestAxialMm + 0.05) {
        throw badFile(file, `${who}: viableAxialMm ${viable} is longer than longestAxialMm ${longestAxialMm}`);
      }
      mark.viableAxialMm = viable;
    }
    return mark;
  });
}

/** A mark as a lesion: its own diameters, no voxels. */
export function lesionFromMark(mark: Mark): Lesion {
  return {
    id: mark.id,
    source: 'mark',
    centroidMm: mark.centreMm,
    volumeMl: null,
    longestAxialMm: mark.longestAxialMm,
    shortAxisMm: mark.shortAxisMm,
    longestAxialEndpointsMm: mark.endpointsMm,
    max3dMm: null,
    meanValue: null,
    voxelCount: 0,
  };
}

function point(x: unknown, file: string, what: string): Vec3 {
  if (!Array.isArray(x) || x.length !== 3 || !x.every((v) => typeof v === 'number' && Number.isFinite(v))) {
    throw badFile(file, `${what} must be three numbers [x, y, z] in mm`);
  }
  return [x[0], x[1], x[2]];
}

function length(x: unknown, file: string, what: string): number {
  if (typeof x !== 'number' || !Number.isFinite(x) || x < 0) throw badFile(file, `${what} must be a length in mm (a number ≥ 0)`);
  return x;
}
