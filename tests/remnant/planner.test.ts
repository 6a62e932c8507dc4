import { describe, expect, it } from 'vitest';
import { FalciformError } from '../../src/errors.js';
import { planRemnant, type PlannerLesion } from '../../src/remnant/planner.js';
import { visitVolumetry, type VisitVolumetry } from '../../src/remnant/volumetry.js';
import type { SegmentName } from '../../src/segments/segment-map.js';
import { blockMap } from './phantom.js';
import { buildSegmentMap } from '../../src/segments/build.js';
import { gridAffine, LIVER, liverVolume, phantomLandmarks, rotation } from '../segments/phantom.js';

/** Invented visit: 1650 mL liver, 40 mL tumour in VIII and 10 mL in II, so 1600 mL tumour-free. */
function visit(split = false): VisitVolumetry {
  const rows: [SegmentName, number, number][] = [
    ['I', 60, 0], ['II', 150, 10], ['III', 140, 0],
    ...(split ? ([['IVa', 100, 0], ['IVb', 150, 0]] as [SegmentName, number, number][]) : ([['IV', 250, 0]] as [SegmentName, number, number][])),
    ['V', 220, 0], ['VI', 230, 0], ['VII', 260, 0], ['VIII', 340, 40],
  ];
  const segments = rows.map(([segment, volumeMl, tumourMl]) => ({ segment, volumeMl, tumourMl, tumourFreeMl: volumeMl - tumourMl }));
  return {
    liverVolumeMl: 1650, tumourVolumeMl: 50, tumourFreeLiverMl: 1600, tumourOutsideSegmentsMl: 0,
    tumourFrom: 'lesion mask', estimated: false, segments, notes: [],
  };
}

describe('remnant share arithmetic', () => {
  it('right hemihepatectomy, measured share only', () => {
    // Remnant I 60 + II (150 − 10) + III 140 + IV 250 = 590 mL; 590 / 1600 = 0.36875.
    const p = planRemnant(visit(), 'right-hemihepatectomy');
    expect(p.resection).toEqual({ id: 'right-hemihepatectomy', name: 'Right hemihepatectomy' });
    expect(p.removedSegments).toEqual(['V', 'VI', 'VII', 'VIII']);
    expect(p.remnantSegments).toEqual(['I', 'II', 'III', 'IV']);
    expect(p.remnantMl).toBeCloseTo(590, 9);
    expect(p.remnantShare).toBeCloseTo(0.36875, 12);
    expect(p.bsaM2).toBeNull();
    expect(p.standardisedLiverMl).toBeNull();
    expect(p.standardisedRemnantShare).toBeNull();
    expect(p.comparedShare.kind).toBe('measured');
    // Commonly quoted minimums (common practice, from memory): 20 %, 30 %, 40 %.
    expect(p.cautions.map((c) => [c.context, c.minimumShare, c.met])).toEqual([
      ['normal liver', 0.2, true], ['after extensive chemotherapy', 0.3, true], ['cirrhosis', 0.4, false],
    ]);
    for (const c of p.cautions) expect(c.source).toMatch(/common practice, from memory.*Local protocols decide/);
    expect(p.cautionsNote).toMatch(/^Commonly quoted minimums; local protocols decide\. Compared with the measured share/);
  });

  it('standardised remnant from height and weight (Mosteller 1987; Vauthey et al., Liver Transpl 2002;8:233-240)', () => {
    // 170 cm, 70 kg: BSA 1.81812 m², standardised liver 1509.66 mL; 590 / 1509.66 = 0.39082.
    const p = planRemnant(visit(), 'right-hemihepatectomy', { heightCm: 170, weightKg: 70 });
    expect(p.bsaM2).toBeCloseTo(1.81812, 5);
    expect(p.standardisedLiverMl).toBeCloseTo(1509.66, 1);
    expect(p.standardisedRemnantShare).toBeCloseTo(0.39082, 5);
    expect(p.remnantShare).toBeCloseTo(0.36875, 12);
    expect(p.comparedShare).toMatchObject({ kind: 'standardised', value: p.standardisedRemnantShare });
  });

  it('the standardised share decides the cautions when known', () => {
    // Right trisectionectomy: remnant I 60 + II 140 + III 140 = 340 mL; measured 340 / 1600 = 0.2125.
    // 160 cm, 50 kg: BSA √(8000/3600) = 1.49071 m²; TLV 1267.28 × 1.49071 − 794.41 = 1094.74 mL;
    // standardised 340 / 1094.74 = 0.31058, which meets 30 % where the measured share does not.
    const measured = planRemnant(visit(), 'right-trisectionectomy');
    const standard = planRemnant(visit(), 'right-trisectionectomy', { heightCm: 160, weightKg: 50 });
    expect(measured.remnantShare).toBeCloseTo(0.2125, 12);
    expect(standard.standardisedRemnantShare).toBeCloseTo(0.31058, 5);
    expect(measured.cautions.map((c) => c.met)).toEqual([true, false, false]);
    expect(standard.cautions.map((c) => c.met)).toEqual([true, true, false]);
  });

  it('segments chosen by hand; IV on a split map; unknown choices', () => {
    // Left lateral sectionectomy by hand: 1600 − 140 − 140 = 1320 mL; 0.825.
    const p = planRemnant(visit(), ['II', 'III', 'II']);
    expect(p.resection).toBeNull();
    expect(p.removedSegments).toEqual(['II', 'III']);
    expect(p.remnantShare).toBeCloseTo(0.825, 12);
    // Left hemihepatectomy on a split map takes IVa and IVb: 1600 − 140 − 140 − 250 = 1070 mL.
    const s = planRemnant(visit(true), 'left-hemihepatectomy');
    expect(s.removedSegments).toEqual(['II', 'III', 'IVa', 'IVb']);
    expect(s.remnantMl).toBeCloseTo(1070, 9);
    expect(() => planRemnant(visit(), 'left-lobectomy')).toThrow(/unknown resection "left-lobectomy"; known: right-hemihepatectomy/);
    expect(() => planRemnant(visit(), ['IX' as SegmentName])).toThrow(FalciformError);
  });

  it('segment I on a landmark-built map without a caudate mask: its tissue is in the plane segments, and the warning says so', () => {
    // The plane rule (brief) labels every liver voxel; without a caudate mask none becomes I, so the
    // liver volume is the whole mask's (nothing is left out) and the caudate is inside other segments.
    const dims: [number, number, number] = [40, 32, 28];
    const affine = gridAffine(rotation(0, 0, 0), [5, 5, 5], dims, LIVER.centre);
    const liver = liverVolume(dims, affine);
    const { map } = buildSegmentMap(liver, phantomLandmarks());
    const vol = { ...visitVolumetry(map, undefined), caudateInPlaneSegments: true };
    let liverVoxels = 0;
    for (let n = 0; n < liver.data.length; n++) if (liver.data[n] > 0) liverVoxels++;
    expect(vol.liverVolumeMl).toBeCloseTo((liverVoxels * 125) / 1000, 6);
    expect(vol.segments.map((s) => s.segment)).not.toContain('I');
    const w = planRemnant(vol, 'right-hemihepatectomy').warnings;
    expect(w.some((x) => /Segment I is not separated .* counted in the plane segments around it/.test(x))).toBe(true);
    expect(w.some((x) => /understated/.test(x))).toBe(false);
  });

  it('warnings: nothing chosen, a segment not in the map, no segment I, half a body size, estimates', () => {
    expect(planRemnant(visit(), []).warnings).toContain('No segments are chosen for removal; the remnant is the whole liver.');
    const noI = visit();
    noI.segments = noI.segments.filter((s) => s.segment !== 'I');
    noI.tumourFreeLiverMl = 1540;
    const p = planRemnant(noI, ['I', 'V'], { heightCm: 170 });
    expect(p.warnings.some((w) => /Segment I is not in this visit's segment map; nothing is removed/.test(w))).toBe(true);
    expect(p.warnings.some((w) => /understated/.test(w))).toBe(true);
    expect(p.warnings.some((w) => /Both height and weight are needed/.test(w))).toBe(true);
    expect(p.comparedShare.kind).toBe('measured');
    const est = { ...visit(), estimated: true, tumourFrom: 'diameters' as const };
    const e = planRemnant(est, 'segmentectomy-5');
    expect(e.estimated).toBe(true);
    expect(e.warnings.some((w) => /estimates from marked diameters/.test(w))).toBe(true);
    expect(planRemnant(visit(), 'right-trisectionectomy', { heightCm: 170, weightKg: 70 }).warnings).toEqual([]);
    expect(() => planRemnant(visit(), 'right-hemihepatectomy', { heightCm: 170, weightKg: 7000 })).toThrow(FalciformError);
  });

  it('a standardised remnant over 100% is explained, with the measured share to read instead', () => {
    // Segmentectomy II: tumour-free remnant 1600 − 140 = 1460 mL; 160 cm, 50 kg: standardised liver 1094.74 mL
    // (above), 1460 / 1094.74 = 133.4%; measured share 1460 / 1600 = 91.25%.
    const p = planRemnant(visit(), 'segmentectomy-2', { heightCm: 160, weightKg: 50 });
    expect(p.comparedShare.value).toBeCloseTo(1.33365, 4);
    expect(p.overFull).toMatch(/^The standardised remnant is 133\.4%, over 100%: .* measured share of the tumour-free liver is 91\.3%\.$/);
    expect(planRemnant(visit(), 'segmentectomy-2', { heightCm: 170, weightKg: 70 }).comparedShare.value).toBeLessThan(1);
    expect(planRemnant(visit(), 'segmentectomy-2', { heightCm: 170, weightKg: 70 }).overFull).toBeNull();
    expect(p.cautionsNote).toMatch(/not a transection plan\. Liver function is not assessed\.$/);
  });

  it('a measured liver far from the one the body size predicts is pointed out', () => {
    // 1650 mL against 1509.66 mL (170 cm, 70 kg) is 109%: no warning. Against 1094.74 mL (160 cm, 50 kg) it is 151%.
    expect(planRemnant(visit(), 'segmentectomy-2', { heightCm: 170, weightKg: 70 }).warnings).toEqual([]);
    const w = planRemnant(visit(), 'segmentectomy-2', { heightCm: 160, weightKg: 50 }).warnings;
    expect(w).toEqual([expect.stringMatching(/^The measured liver \(1650\.0 mL\) is 151% of the standardised total liver volume for this height and weight \(1094\.7 mL\)/)]);
  });
});

describe('lesions that would stay in the remnant', () => {
  const lesions: PlannerLesion[] = [
    { id: 'A', segment: 'VIII', marginAlert: true, segmentFractions: { VIII: 1 }, nearestOtherSegment: 'V' },
    { id: 'B', segment: 'II', marginAlert: true },
    { id: 'C', segment: 'III', marginAlert: false },
    { id: 'D', segment: 'VIII', marginAlert: true, segmentFractions: { VIII: 0.6, IV: 0.4 }, nearestOtherSegment: 'IV' },
    { id: 'E', segment: 'V', marginAlert: true, segmentFractions: { V: 1 }, nearestOtherSegment: 'IV' },
    { id: 'F', segment: null, marginAlert: false },
  ];

  it('right hemihepatectomy keeps B and C; the cut runs through D (0.4 of it in IV stays); E lies near the cut', () => {
    const p = planRemnant(visit(), 'right-hemihepatectomy', undefined, lesions);
    expect(p.lesionsInRemnant).toEqual(['B', 'C']);
    expect(p.lesionsCrossingCut).toEqual([{ id: 'D', keptShare: 0.4 }]);
    expect(p.alertLesionsInRemnant).toEqual(['B', 'D']);
    expect(p.alertLesionsAtTransection).toEqual(['E']);
  });

  it('right trisectionectomy takes D and E whole', () => {
    const p = planRemnant(visit(), 'right-trisectionectomy', undefined, lesions);
    expect(p.lesionsInRemnant).toEqual(['B', 'C']);
    expect(p.lesionsCrossingCut).toEqual([]);
    expect(p.alertLesionsInRemnant).toEqual(['B']);
    expect(p.alertLesionsAtTransection).toEqual([]);
  });

  it('a segmentectomy never says a lesion of the removed segment stays: A goes with VIII, D crosses the cut', () => {
    const p = planRemnant(visit(), 'segmentectomy-8', undefined, lesions);
    expect(p.lesionsInRemnant).toEqual(['B', 'C', 'E']);
    expect(p.lesionsCrossingCut).toEqual([{ id: 'D', keptShare: 0.4 }]);
    expect(p.alertLesionsAtTransection).toEqual(['A']);
  });

  it('IV and IVa/IVb name the same tissue', () => {
    const split: PlannerLesion[] = [
      { id: 'P', segment: 'IVb', marginAlert: true },
      { id: 'Q', segment: 'IV', marginAlert: true },
    ];
    expect(planRemnant(visit(true), 'left-medial-sectionectomy', undefined, split).alertLesionsInRemnant).toEqual([]);
    expect(planRemnant(visit(true), ['IVa', 'IVb'], undefined, split).alertLesionsInRemnant).toEqual([]);
    expect(planRemnant(visit(true), ['IVa'], undefined, split).alertLesionsInRemnant).toEqual(['P', 'Q']);
  });
});

it('from a segment map to a plan: the phantom liver (192 mL) less a left hemihepatectomy', () => {
  // Blocks of 24 mL; 1 mL estimated tumour in V (π/6 × 20 × 10² mm³ = 1.0472 mL).
  const v = visitVolumetry(blockMap(true), [{ segment: 'V', longestAxialMm: 20, shortAxisMm: 10 }]);
  const p = planRemnant(v, 'left-hemihepatectomy');
  // Remnant I, V, VI, VII, VIII: 5 × 24 − 1.0472 = 118.9528 mL of 192 − 1.0472 = 190.9528 mL.
  expect(p.removedSegments).toEqual(['II', 'III', 'IVa', 'IVb']);
  expect(p.remnantMl).toBeCloseTo(118.9528, 4);
  expect(p.remnantShare).toBeCloseTo(118.9528 / 190.9528, 6);
  expect(p.estimated).toBe(true);
});
