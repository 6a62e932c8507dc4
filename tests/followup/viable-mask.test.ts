import { describe, expect, it } from 'vitest';
import { parseManifest } from '../../src/manifest/manifest.js';
import { followupOfPatient, loadPatientFrom, type PatientFiles } from '../../src/patient/load.js';
import { makeVolume, type Volume } from '../../src/volume/volume.js';
import { maskVolume, type V3 } from './phantom.js';

// mRECIST (Lencioni and Llovet, Semin Liver Dis 2010;30:52-60, from memory): the viable diameter is
// the longest diameter of the arterially enhancing tumour, not crossing necrosis; a target must have a
// viable part measurable as at least 1 cm. An invented patient read through the ordinary loader:
// v1 has two lesions, L1 a 30 mm ball whose enhancing part is a shell (outer radius 15, necrotic core
// radius 9 mm) and L2 a 30 mm ball with only a 6 mm enhancing focus.
//
// Analytic values: in every slice that cuts the core the shell is a ring of radii √(15² − z²) and
// √(9² − z²), whose longest chord missing the core is 2·√(15² − 9²) = 24 mm (the chord tangent to
// the core); the outer width is 30 mm.

const spacing: V3 = [0.8, 0.8, 2];
const dims: V3 = [140, 60, 24];
const affine = [spacing[0], 0, 0, -56, 0, spacing[1], 0, -24, 0, 0, spacing[2], -23, 0, 0, 0, 1];
const C1: V3 = [-25.3, 0.1, 0], C2: V3 = [25.1, -0.2, 0];
const dist = (p: V3, c: V3) => Math.hypot(p[0] - c[0], p[1] - c[1], p[2] - c[2]);

function patient(): { source: PatientFiles; manifest: ReturnType<typeof parseManifest> } {
  const lesions = maskVolume(dims, affine, (p) => dist(p, C1) <= 15 || dist(p, C2) <= 15);
  const viable = maskVolume(dims, affine, (p) => (dist(p, C1) <= 15 && dist(p, C1) >= 9) || dist(p, C2) <= 3);
  const segments = maskVolume(dims, affine, () => true);
  segments.data.fill(8);
  const scan = makeVolume(dims, new Int16Array(dims[0] * dims[1] * dims[2]).fill(60), affine, 'int16');
  const volumes: Record<string, Volume> = { 'v1/scan.nii.gz': scan, 'v1/segments.nii.gz': segments, 'v1/lesions.nii.gz': lesions, 'v1/viable.nii.gz': viable };
  const manifest = parseManifest(
    JSON.stringify({
      patient: { id: 'TEST-0007' },
      criteria: 'mRECIST',
      visits: [{ id: 'v1', date: '2026-01-12', scan: 'v1/scan.nii.gz', segments: 'v1/segments.nii.gz', lesions: 'v1/lesions.nii.gz', viable: 'v1/viable.nii.gz' }],
    }),
    'manifest.json',
  );
  const source: PatientFiles = {
    name: (p) => p,
    volume: async (p) => ({ volume: volumes[p], warnings: [] }),
    text: async () => {
      throw new Error('no text files');
    },
  };
  return { source, manifest };
}

describe('viable diameters from a viable-tumour mask', () => {
  it('a rim-enhancing lesion measures its rim (24 mm), not its width (30 mm); a 6 mm focus does not make a target', async () => {
    const { source, manifest } = patient();
    const loaded = await loadPatientFrom(manifest, 'manifest.json', source);
    const r = followupOfPatient(loaded);
    const byCentre = (c: V3) => r.tracks.find((t) => {
      const l = loaded.visits[0].analysis.lesions.find((x) => x.id === t.lesions.v1)!;
      return dist(l.centroidMm as V3, c) < 2;
    })!;
    const rim = byCentre(C1), focus = byCentre(C2);
    // Whole lesions: 30 mm within a voxel (RECIST longest diameter).
    expect(Math.abs(rim.longestAxialMm.v1 - 30)).toBeLessThanOrEqual(0.8);
    // Viable: the tangent chord, within one in-plane voxel diagonal (0.8·√2 mm).
    expect(Math.abs(rim.viableAxialMm!.v1! - 24)).toBeLessThanOrEqual(0.8 * Math.SQRT2);
    // The 3 mm-radius focus: 6 mm within a voxel diagonal; under 10 mm, so not measurable viable tumour.
    expect(Math.abs(focus.viableAxialMm!.v1! - 6)).toBeLessThanOrEqual(0.8 * Math.SQRT2);
    expect(r.criteria).toBe('mRECIST');
    expect(r.targets.tracks).toEqual([rim.id]);
    expect(focus.target).toBe(false);
    expect(r.visits[0].response.baselineSumMm).toBeCloseTo(rim.viableAxialMm!.v1!, 1);
  });
});
