import { describe, expect, it } from 'vitest';
import { LANDMARK_NAMES, type LandmarkName, type LandmarkSet } from '../../src/segments/landmarks.js';
import { landmarkQc, parseReferenceSets } from '../../src/segments/qc.js';
import { phantomLandmarks, rotation, type V3 } from './phantom.js';

/** Deterministic pseudo-random numbers (LCG), so the tests do not depend on a seedless generator. */
function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
}

function transform(set: LandmarkSet, R: number[], t: V3, scale = 1): LandmarkSet {
  const points = {} as Record<LandmarkName, V3>;
  for (const name of LANDMARK_NAMES) {
    const p = set.points[name];
    points[name] = [0, 1, 2].map((r) => scale * (R[r * 3] * p[0] + R[r * 3 + 1] * p[1] + R[r * 3 + 2] * p[2]) + t[r]) as V3;
  }
  return { points };
}

function jitter(set: LandmarkSet, mm: number, next: () => number): LandmarkSet {
  const points = {} as Record<LandmarkName, V3>;
  for (const name of LANDMARK_NAMES) points[name] = set.points[name].map((x) => x + (next() * 2 - 1) * mm) as V3;
  return { points };
}

function moveOne(set: LandmarkSet, name: LandmarkName, dir: V3, mm: number): LandmarkSet {
  const len = Math.hypot(...dir);
  const points = { ...set.points };
  points[name] = set.points[name].map((x, n) => x + (dir[n] / len) * mm) as V3;
  return { points };
}

const DIRECTIONS: V3[] = [[1, 0, 0], [-1, 0, 0], [0, 1, 0], [0, -1, 0], [0, 0, 1], [0, 0, -1], [1, 1, 1], [-1, 2, -0.5]];

describe('landmark QC by spatial configuration (source: pairwise distances are invariant under rigid motion)', () => {
  const base = phantomLandmarks();

  it('scores a rigidly moved configuration as perfect and names no landmark', () => {
    const moved = transform(base, rotation(0.4, -0.3, 1.1), [35, -60, 120]);
    const qc = landmarkQc(moved, [base]);
    expect(qc.correlation).toBeCloseTo(1, 12);
    expect(qc.maxChangeMm).toBeLessThan(1e-9);
    expect(qc.worstLandmark).toBeNull();
    expect(qc.correlationWithout).toBeNull();
    expect(qc.comparedWith).toBe(1);
  });

  for (const name of LANDMARK_NAMES) {
    it(`names ${name} when it alone moved by 20 mm, in any direction`, () => {
      const earlier = [base, transform(base, rotation(0.1, 0.2, -0.3), [5, 5, -40])];
      for (const dir of DIRECTIONS) {
        const visit = transform(moveOne(base, name, dir, 20), rotation(-0.2, 0.05, 0.6), [-12, 30, 7]);
        const qc = landmarkQc(visit, earlier);
        expect(qc.worstLandmark, `direction ${dir.join(',')}`).toBe(name);
        expect(qc.correlationWithout).toBeCloseTo(1, 9);
        expect(qc.correlation).toBeLessThan(1);
        expect(qc.maxChangeMm).toBeGreaterThan(5);
        expect(qc.maxChangeMm).toBeLessThanOrEqual(20 + 1e-9);
        expect(qc.maxChangePair).toContain(name);
      }
    });
  }

  it('names no landmark when every point varies by up to 1 mm of placement noise', () => {
    const next = rng(7);
    for (let trial = 0; trial < 50; trial++) {
      const qc = landmarkQc(jitter(base, 1, next), [jitter(base, 1, next), jitter(base, 1, next)]);
      expect(qc.worstLandmark).toBeNull();
      expect(qc.correlation).toBeGreaterThan(0.99);
    }
  });

  it('compares with reference configurations of other sizes after one size factor each', () => {
    const next = rng(11);
    const reference = [0.85, 0.95, 1.1, 1.2].map((s, n) => jitter(transform(base, rotation(n * 0.3, 0, n * 0.2), [n * 10, 0, 0], s), 2, next));
    const same = landmarkQc(transform(base, rotation(0, 0.5, 0), [0, 0, 0], 1.05), [], reference);
    expect(same.correlation).toBeGreaterThan(0.99);
    expect(same.worstLandmark).toBeNull();
    expect(same.referenceSets).toBe(4);
    const bad = landmarkQc(moveOne(base, 'umbilical_fissure', [0, -1, 0.3], 20), [], reference);
    expect(bad.worstLandmark).toBe('umbilical_fissure');
    expect(bad.correlationWithout as number).toBeGreaterThan(bad.correlation);
  });

  it('needs something to compare with', () => {
    expect(() => landmarkQc(base, [], [])).toThrow(/nothing to compare with/);
  });
});

describe('reference-set files', () => {
  it('reads an array of landmark sets or {"sets": [...]}', () => {
    const one = { space: 'RAS', units: 'mm', points: phantomLandmarks().points };
    expect(parseReferenceSets(JSON.stringify([one, one]), 'ref.json')).toHaveLength(2);
    expect(parseReferenceSets(JSON.stringify({ sets: [one] }), 'ref.json')).toHaveLength(1);
  });

  it('names the file and the set that is wrong', () => {
    const one = { points: phantomLandmarks().points };
    const bad = { points: { ...phantomLandmarks().points, ivc_inferior: undefined } };
    expect(() => parseReferenceSets(JSON.stringify([one, bad]), 'ref.json')).toThrow(/^ref\.json: set 2: ivc_inferior is missing$/);
    expect(() => parseReferenceSets('[]', 'ref.json')).toThrow(/holds no landmark set/);
    expect(() => parseReferenceSets('{"x": 1}', 'ref.json')).toThrow(/expected an array of landmark sets/);
  });
});
