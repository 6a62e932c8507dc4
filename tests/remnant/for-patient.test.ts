import { describe, expect, it } from 'vitest';
import { nodeInflate } from '../../src/cli/node-io.js';
import { parseManifest, type Manifest } from '../../src/manifest/manifest.js';
import { loadPatientFrom, type PatientFiles } from '../../src/patient/load.js';
import { remnantForPatient, type RemnantVisit, type TrackOfLesions } from '../../src/remnant/for-patient.js';
import type { VisitVolumetry } from '../../src/remnant/volumetry.js';
import type { SegmentName } from '../../src/segments/segment-map.js';
import { readNifti } from '../../src/volume/nifti-read.js';
import { patientFolder } from '../store/fixtures.js';

/** Invented visit: 1650 mL liver, 40 mL tumour in VIII and 10 mL in II, so 1600 mL tumour-free. */
function volumetry(): VisitVolumetry {
  const rows: [SegmentName, number, number][] = [
    ['I', 60, 0], ['II', 150, 10], ['III', 140, 0], ['IV', 250, 0],
    ['V', 220, 0], ['VI', 230, 0], ['VII', 260, 0], ['VIII', 340, 40],
  ];
  return {
    liverVolumeMl: 1650, tumourVolumeMl: 50, tumourFreeLiverMl: 1600, tumourOutsideSegmentsMl: 0,
    tumourFrom: 'lesion mask', estimated: false, notes: [],
    segments: rows.map(([segment, volumeMl, tumourMl]) => ({ segment, volumeMl, tumourMl, tumourFreeMl: volumeMl - tumourMl })),
  };
}

const visit: RemnantVisit = {
  id: 'v3',
  date: '2026-05-04',
  volumetry: volumetry(),
  lesions: [
    { id: 'L1', segment: 'VIII', marginAlert: false, segmentFractions: { VIII: 1 }, nearestOtherSegment: 'V', marginMm: 14 },
    { id: 'L2', segment: 'II', marginAlert: true, segmentFractions: { II: 1 }, nearestOtherSegment: 'III', marginMm: 4.5 },
    { id: 'L3', segment: 'V', marginAlert: true, segmentFractions: { V: 1 }, nearestOtherSegment: 'IV', marginMm: 2 },
  ],
};

const manifest = (extra: Partial<Manifest> = {}): Pick<Manifest, 'patient' | 'resection'> => ({
  patient: { id: 'TEST-0001', heightCm: 172, weightKg: 80 },
  ...extra,
});

describe('remnant of the proposed resection', () => {
  it('nothing proposed, or no visit: no plan', () => {
    expect(remnantForPatient(manifest(), visit)).toBeNull();
    expect(remnantForPatient(manifest({ resection: { preset: 'right-hemihepatectomy' } }), undefined)).toBeNull();
  });

  it("the manifest's preset with its height and weight (Mosteller 1987; Vauthey et al., Liver Transpl 2002;8:233-240)", () => {
    const p = remnantForPatient(manifest({ resection: { preset: 'right-hemihepatectomy' } }), visit)!;
    expect(p.visitId).toBe('v3');
    expect(p.label).toBe('Right hemihepatectomy (removes V, VI, VII, VIII)');
    // Remnant I 60 + II 140 + III 140 + IV 250 = 590 mL of 1600 mL tumour-free: 0.36875.
    expect(p.remnantMl).toBeCloseTo(590, 9);
    expect(p.remnantShare).toBeCloseTo(0.36875, 12);
    // 172 cm, 80 kg: BSA √(13760 / 3600) = √3.82222 = 1.95505 m²;
    // TLV 1267.28 × 1.95505 − 794.41 = 2477.60 − 794.41 = 1683.19 mL; 590 / 1683.19 = 0.35053.
    expect(p.bsaM2).toBeCloseTo(1.95505, 5);
    expect(p.standardisedLiverMl).toBeCloseTo(1683.19, 1);
    expect(p.standardisedRemnantShare).toBeCloseTo(0.35053, 5);
    // Commonly quoted minimums (common practice, from memory): 20 %, 30 % met; 40 % not.
    expect(p.cautions.map((c) => c.met)).toEqual([true, true, false]);
    // L2 (II) stays with its alert; L3 (V) goes, but its alert points at IV, which stays.
    expect(p.alertLesions).toEqual([
      { lesion: 'L2', track: null, segment: 'II', marginMm: 4.5, nearestOtherSegment: 'III', where: 'in remnant' },
      { lesion: 'L3', track: null, segment: 'V', marginMm: 2, nearestOtherSegment: 'IV', where: 'at transection' },
    ]);
    expect(p.warnings).toEqual([]);
  });

  it("the app's choice, body size and tracks replace the manifest's", () => {
    const m = manifest({ resection: { preset: 'right-hemihepatectomy' } });
    const tracks: TrackOfLesions[] = [{ id: 'A', lesions: { v1: 'L4', v3: 'L2' } }, { id: 'B', lesions: { v1: 'L1' } }];
    const p = remnantForPatient(m, visit, { resection: { segments: ['II', 'III'] }, body: { heightCm: null, weightKg: null }, tracks })!;
    expect(p.resection).toBeNull();
    expect(p.label).toBe('Chosen segments (removes II, III)');
    // 1600 − 140 − 140 = 1320 mL; 0.825. No height or weight: the measured share decides.
    expect(p.remnantMl).toBeCloseTo(1320, 9);
    expect(p.standardisedRemnantShare).toBeNull();
    expect(p.comparedShare.kind).toBe('measured');
    expect(p.alertLesions.map((a) => [a.lesion, a.track, a.where])).toEqual([['L3', null, 'in remnant']]);
    const q = remnantForPatient(m, visit, { resection: { preset: 'left-lateral-sectionectomy' }, tracks })!;
    expect(q.alertLesions.map((a) => [a.lesion, a.track, a.where])).toEqual([['L3', null, 'in remnant']]);
    const r = remnantForPatient(m, visit, { resection: { segments: ['V'] }, tracks })!;
    expect(r.alertLesions.map((a) => [a.lesion, a.track, a.where])).toEqual([['L2', 'A', 'in remnant'], ['L3', null, 'at transection']]);
    expect(r.lesionTracks).toEqual({ L2: 'A' });
  });

  it('a height or weight the formulas refuse gives the measured share and says why', () => {
    const p = remnantForPatient({ patient: { id: 'X', heightCm: 1.72, weightKg: 80 }, resection: { preset: 'right-hemihepatectomy' } }, visit)!;
    expect(p.bsaM2).toBeNull();
    expect(p.comparedShare.kind).toBe('measured');
    expect(p.warnings[0]).toMatch(/^Height 1.72 cm and weight 80 kg are not used \(height: 1.72 cm is outside the plausible 100–250 cm/);
  });
});

describe('every loaded visit carries its volumetry', () => {
  it('a lesion mask gives measured tumour, marks give estimates flagged as such', async () => {
    const files = new Map(patientFolder({ id: 'TEST-0002', root: 'p' }).map((f) => [f.relativePath.slice(2), f.bytes]));
    const bytes = (p: string) => files.get(p) ?? (() => { throw new Error(`no ${p}`); })();
    const source: PatientFiles = {
      name: (p) => p,
      volume: (p) => readNifti(bytes(p), p, { inflate: nodeInflate }),
      text: async (p) => new TextDecoder().decode(bytes(p)),
    };
    const m = parseManifest(new TextDecoder().decode(bytes('manifest.json')), 'manifest.json');
    const patient = await loadPatientFrom(m, 'manifest.json', source);
    const [v1, v2] = patient.visits;

    // Segment sums equal the liver volume (the brief: volume = voxel count × voxel volume), as the analysis counts it.
    for (const v of [v1, v2]) {
      expect(v.volumetry.liverVolumeMl).toBeCloseTo(v.analysis.liverVolumeMl, 9);
      expect(v.volumetry.segments.map((s) => [s.segment, s.volumeMl])).toEqual(v.analysis.segments.map((s) => [s.segment, s.volumeMl]));
      expect(v.volumetry.tumourFreeLiverMl + v.volumetry.tumourVolumeMl).toBeCloseTo(v.volumetry.liverVolumeMl, 9);
    }
    // v1: the mask's voxels, on the map's own grid, are the lesions' own volumes.
    expect(v1.volumetry.tumourFrom).toBe('lesion mask');
    expect(v1.volumetry.estimated).toBe(false);
    const lesionMl = v1.analysis.lesions.reduce((a, l) => a + (l.volumeMl ?? 0), 0);
    expect(lesionMl).toBeGreaterThan(0);
    expect(v1.volumetry.tumourVolumeMl + v1.volumetry.tumourOutsideSegmentsMl).toBeCloseTo(lesionMl, 9);
    // v2: mark M1, 14.2 × 12.9 mm: π/6 × 14.2 × 12.9² mm³ = 1.23728 mL, in the segment its centre falls in.
    expect(v2.volumetry.tumourFrom).toBe('diameters');
    expect(v2.volumetry.estimated).toBe(true);
    const seg = v2.analysis.lesions[0].segment!;
    expect(v2.volumetry.segments.find((s) => s.segment === seg)!.tumourMl).toBeCloseTo(1.23728, 5);
    expect(v2.volumetry.tumourVolumeMl).toBeCloseTo(1.23728, 5);
    // Plain data, so it crosses from a worker to the window unchanged.
    expect(structuredClone(v2.volumetry)).toEqual(v2.volumetry);

    const plan = remnantForPatient({ ...m, resection: { segments: [seg] } }, {
      id: v2.manifest.id, date: v2.manifest.date, volumetry: v2.volumetry, lesions: v2.analysis.lesions,
    })!;
    expect(plan.estimated).toBe(true);
    expect(plan.remnantMl).toBeCloseTo(v2.volumetry.tumourFreeLiverMl - v2.volumetry.segments.find((s) => s.segment === seg)!.tumourFreeMl, 9);
  });
});
