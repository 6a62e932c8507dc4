import { describe, expect, it } from 'vitest';
import { buildSegmentMap } from '../../src/segments/build.js';
import { checkLandmarks, LANDMARK_NAMES, type LandmarkSet } from '../../src/segments/landmarks.js';
import { segmentAtWorld } from '../../src/segments/segment-map.js';
import { makeVolume } from '../../src/volume/volume.js';
import { gridAffine, LIVER, nearTie, phantomLandmarks, planeRule, planeDistances, rotation, worldOf, type V3 } from './phantom.js';

// Source: the brief's plane method — each vein plane's normal points to the side of the more lateral
// section, for the nearly coronal right-hepatic-vein plane the side away from the middle hepatic vein.
// Anatomy does not change when the body turns in the scanner: a landmark set and the liver rotated
// together by ±20° about each axis must give every point the segment it had before the rotation.

const apply = (R: number[], c: V3, p: readonly number[]): V3 => {
  const d = [p[0] - c[0], p[1] - c[1], p[2] - c[2]];
  return [0, 1, 2].map((r) => c[r] + R[r * 3] * d[0] + R[r * 3 + 1] * d[1] + R[r * 3 + 2] * d[2]) as V3;
};
const transpose = (R: number[]) => [R[0], R[3], R[6], R[1], R[4], R[7], R[2], R[5], R[8]];

function rotated(set: LandmarkSet, R: number[]): LandmarkSet {
  const points = { ...set.points };
  for (const name of LANDMARK_NAMES) points[name] = apply(R, LIVER.centre, set.points[name]);
  if (set.points.left_portal_umbilical) points.left_portal_umbilical = apply(R, LIVER.centre, set.points.left_portal_umbilical);
  return { points };
}

describe('vein-plane orientation from the landmarks themselves', () => {
  const dims: V3 = [52, 42, 36];
  const cases: [string, number, number, number][] = [];
  for (const deg of [20, -20]) {
    const a = (deg * Math.PI) / 180;
    cases.push([`${deg}° about x`, a, 0, 0], [`${deg}° about y`, 0, a, 0], [`${deg}° about z`, 0, 0, a]);
  }
  for (const [name, ax, ay, az] of cases) {
    it(`keeps every segment with the set and the liver rotated ${name}`, () => {
      const R = rotation(ax, ay, az);
      const base = phantomLandmarks();
      const set = rotated(base, R);
      expect(() => checkLandmarks(set, 'rotated.json')).not.toThrow();
      // A 4 mm grid over the liver, itself rotated with the body; every voxel is liver here.
      const affine = gridAffine(R, [4, 4, 4], dims, LIVER.centre);
      const liver = makeVolume(dims, new Uint8Array(dims[0] * dims[1] * dims[2]).fill(1), affine, 'uint8');
      const { map } = buildSegmentMap(liver, set);
      const back = transpose(R);
      let checked = 0, wrong = 0;
      for (let k = 0; k < dims[2]; k += 3) for (let j = 0; j < dims[1]; j += 3) for (let i = 0; i < dims[0]; i += 3) {
        const w = worldOf(affine, i, j, k);
        const p = apply(back, LIVER.centre, w);
        if (nearTie(base, p, 1e-3)) continue;
        checked++;
        if (segmentAtWorld(map, w) !== planeRule(base, p, false)) wrong++;
      }
      expect(checked).toBeGreaterThan(1000);
      expect(wrong).toBe(0);
    });
  }

  it('a 20° turn about the vertical axis flips the sign of the right-hepatic-vein plane normal\'s x component', () => {
    // Why the orientation comes from the landmarks: this plane is nearly coronal (its normal about 18°
    // from the y axis here), so "normal towards +x" would turn its right side into its left.
    const normalX = (set: LandmarkSet) => {
      const { ivc_superior: s, ivc_inferior: i, right_hepatic_vein: v } = set.points;
      return (s[1] - i[1]) * (v[2] - i[2]) - (s[2] - i[2]) * (v[1] - i[1]);
    };
    const signs = [20, -20].map((deg) => Math.sign(normalX(rotated(phantomLandmarks(), rotation(0, 0, (deg * Math.PI) / 180)))));
    expect(signs).toContain(-Math.sign(normalX(phantomLandmarks())));
  });
});

describe('segments II and III (optional seventh landmark)', () => {
  it('divides the left lateral section at the umbilical part of the left portal vein when given', () => {
    // Source: the brief's plane method with the II/III plane through the given point, normal along the
    // IVC axis; II above, III below. Without the point the main portal plane divides them (with a warning).
    const set = phantomLandmarks();
    set.points.left_portal_umbilical = [-40, 20, 35];
    const dims: V3 = [52, 42, 36];
    const affine = gridAffine(rotation(0, 0, 0), [4, 4, 4], dims, LIVER.centre);
    const liver = makeVolume(dims, new Uint8Array(dims[0] * dims[1] * dims[2]).fill(1), affine, 'uint8');
    const withPoint = buildSegmentMap(liver, set);
    const without = buildSegmentMap(liver, phantomLandmarks());
    expect(without.warnings.join(' ')).toMatch(/II and III are divided by the main portal plane \(an approximation\)/);
    expect(withPoint.warnings.join(' ')).not.toMatch(/II and III/);
    const { ivc_superior: sup, ivc_inferior: inf } = set.points;
    const axis = [sup[0] - inf[0], sup[1] - inf[1], sup[2] - inf[2]];
    const len = Math.hypot(...axis);
    let between = 0;
    for (let k = 0; k < dims[2]; k++) for (let j = 0; j < dims[1]; j++) for (let i = 0; i < dims[0]; i++) {
      const p = worldOf(affine, i, j, k);
      const d = planeDistances(set, p);
      if (d.uf > 0 || d.mhv > 0 || d.rhv > 0) continue;
      const h = ((p[0] - -40) * axis[0] + (p[1] - 20) * axis[1] + (p[2] - 35) * axis[2]) / len;
      if (Math.abs(h) < 1e-3 || Math.abs(d.portal) < 1e-3) continue;
      expect(segmentAtWorld(withPoint.map, p)).toBe(h > 0 ? 'II' : 'III');
      expect(segmentAtWorld(without.map, p)).toBe(d.portal > 0 ? 'II' : 'III');
      if (d.portal > 0 && h < 0) between++;
    }
    // Above the portal plane but below the II/III plane: III with the point, II without it.
    expect(between).toBeGreaterThan(50);
  });
});
