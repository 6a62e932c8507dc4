import { describe, expect, it } from 'vitest';
import { checkLandmarks, LANDMARK_NAMES, parseLandmarks, type LandmarkSet } from '../../src/segments/landmarks.js';
import { FalciformError } from '../../src/errors.js';
import { phantomLandmarks } from './phantom.js';

const json = (set: LandmarkSet, extra: object = {}) => JSON.stringify({ space: 'RAS', units: 'mm', points: set.points, ...extra });

function problem(set: LandmarkSet): string {
  try {
    checkLandmarks(set, 'lm.json');
  } catch (e) {
    expect(e).toBeInstanceOf(FalciformError);
    expect((e as FalciformError).kind).toBe('bad-landmarks');
    return (e as Error).message;
  }
  return '';
}

describe('landmark-set files (source: contracts.md, landmark set)', () => {
  it('reads the six points', () => {
    const set = parseLandmarks(json(phantomLandmarks()), 'lm.json');
    expect(Object.keys(set.points).sort()).toEqual([...LANDMARK_NAMES].sort());
    expect(set.points.portal_bifurcation).toEqual([10, 0, 15]);
  });

  it('names every missing or malformed point in one message', () => {
    const text = JSON.stringify({ points: { ivc_superior: [1, 2, 3], ivc_inferior: [1, 2], right_hepatic_vein: 'x' } });
    expect(() => parseLandmarks(text, 'lm.json')).toThrow(
      /^lm\.json: ivc_inferior must be \[x, y, z\] in mm; right_hepatic_vein must be \[x, y, z\] in mm; middle_hepatic_vein is missing; umbilical_fissure is missing; portal_bifurcation is missing$/,
    );
  });

  it('refuses LPS points, other units and bad JSON', () => {
    expect(() => parseLandmarks(json(phantomLandmarks(), { space: 'LPS' }), 'lm.json')).toThrow(/space is "LPS"; landmark points must be in RAS/);
    expect(() => parseLandmarks(json(phantomLandmarks(), { units: 'cm' }), 'lm.json')).toThrow(/units is "cm"/);
    expect(() => parseLandmarks('{', 'lm.json')).toThrow(/^lm\.json: not valid JSON/);
    expect(() => parseLandmarks('[]', 'lm.json')).toThrow(/expected a landmark-set object/);
  });
});

describe('landmark-set checks before the plane rule (source: brief, plane method)', () => {
  it('accepts the phantom set', () => {
    expect(() => checkLandmarks(phantomLandmarks(), 'lm.json')).not.toThrow();
  });

  it('refuses non-finite and missing points', () => {
    const set = phantomLandmarks();
    set.points.umbilical_fissure = [Number.NaN, 0, 0];
    delete (set.points as Partial<LandmarkSet['points']>).portal_bifurcation;
    expect(problem(set)).toBe('lm.json: umbilical_fissure must be three finite numbers; portal_bifurcation is missing');
  });

  it('refuses IVC points too close together', () => {
    const set = phantomLandmarks();
    set.points.ivc_superior = [15, -35, -14];
    expect(problem(set)).toMatch(/ivc_superior and ivc_inferior are 6\.0 mm apart; they must be at least 10 mm apart/);
  });

  it('refuses swapped IVC points', () => {
    const set = phantomLandmarks();
    [set.points.ivc_superior, set.points.ivc_inferior] = [set.points.ivc_inferior, set.points.ivc_superior];
    expect(problem(set)).toMatch(/ivc_superior is not above ivc_inferior/);
  });

  it('refuses a vein point on the IVC axis (degenerate plane)', () => {
    const set = phantomLandmarks();
    set.points.middle_hepatic_vein = [16.5, -32.5, 15]; // midway between the IVC points
    expect(problem(set)).toMatch(/middle_hepatic_vein is 0\.0 mm from the IVC axis; its plane is undefined/);
  });

  it('refuses vein points out of right-to-left order', () => {
    const set = phantomLandmarks();
    [set.points.right_hepatic_vein, set.points.umbilical_fissure] = [set.points.umbilical_fissure, set.points.right_hepatic_vein];
    // Mirrored: the plane of the (now leftmost) umbilical fissure has the middle hepatic vein on the patient's left.
    expect(problem(set)).toMatch(/has the middle hepatic vein on the patient's left.*expected right_hepatic_vein, middle_hepatic_vein, umbilical_fissure from the patient's right to left/);
    // Right hepatic vein and middle hepatic vein swapped.
    const other = phantomLandmarks();
    [other.points.right_hepatic_vein, other.points.middle_hepatic_vein] = [other.points.middle_hepatic_vein, other.points.right_hepatic_vein];
    expect(problem(other)).toMatch(/expected right_hepatic_vein, middle_hepatic_vein, umbilical_fissure from the patient's right to left/);
  });

  it('lists several problems in one message', () => {
    const set = phantomLandmarks();
    [set.points.ivc_superior, set.points.ivc_inferior] = [set.points.ivc_inferior, set.points.ivc_superior];
    set.points.right_hepatic_vein = [16.5, -32.5, 15];
    const msg = problem(set);
    expect(msg).toMatch(/not above/);
    expect(msg).toMatch(/right_hepatic_vein is 0\.0 mm from the IVC axis/);
  });
});
