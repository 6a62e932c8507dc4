// Invented patients for the report tests, built from lesion records rather than images so the page's
// limits (many visits, many tracks, alerts, warnings) can be reached cheaply. Follow-up is the real
// runFollowup on these lesions.
import { runFollowup } from '../../src/followup/followup.js';
import type { Manifest } from '../../src/manifest/manifest.js';
import { remnantForPatient } from '../../src/remnant/for-patient.js';
import type { VisitVolumetry } from '../../src/remnant/volumetry.js';
import type { ReportInput } from '../../src/report/input.js';
import type { SegmentName } from '../../src/segments/segment-map.js';
import type { LesionResult, VisitAnalysis } from '../../src/visit/analyze.js';

type V3 = [number, number, number];

const SEGMENTS: SegmentName[] = ['II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII', 'I'];

function lesion(id: string, c: V3, segment: SegmentName | null, mm: number, marginMm: number | null, other: SegmentName | null): LesionResult {
  return {
    id,
    centroidMm: c,
    segment,
    segmentFractions: segment ? (marginMm === 0 && other ? { [segment]: 0.6, [other]: 0.4 } : { [segment]: 1 }) : {},
    volumeMl: mm > 0 ? (Math.PI / 6) * mm * (0.8 * mm) ** 2 / 1000 : null,
    longestAxialMm: mm,
    shortAxisMm: 0.8 * mm,
    marginMm,
    nearestOtherSegment: other,
    marginAlert: marginMm !== null && marginMm < 10,
    source: 'mask',
    max3dMm: mm * 1.05,
    meanValue: 50,
    longestAxialEndpointsMm: null,
    voxelCount: 100,
    segmentWarning: null,
  };
}

export interface SyntheticOptions {
  visits: number;
  lesions: number;
  /** A lesion id with a comma and quote to test the CSV writer on real rows. */
  oddTreatment?: boolean;
  id?: string;
  /** Plan a right hemihepatectomy on the last visit for the remnant line. */
  remnant?: boolean;
  /** Viable diameters (half of each lesion's, to a tenth) and mRECIST as the criteria. */
  viable?: boolean;
}

/**
 * One patient: `lesions` lesions spread through the segments, shrinking then growing, every third one
 * near a border (margin alert), one gone after the second visit, one new at the third; each visit a
 * month apart.
 */
export function syntheticPatient(o: SyntheticOptions): ReportInput {
  const dates = Array.from({ length: o.visits }, (_, k) => new Date(Date.UTC(2026, k, 10)).toISOString().slice(0, 10));
  const visits = dates.map((date, k) => {
    const lesions: LesionResult[] = [];
    for (let n = 0; n < o.lesions; n++) {
      if (n === 1 && k >= 2) continue; // gone
      if (n === o.lesions - 1 && k < 2) continue; // new at the third visit
      const seg = SEGMENTS[n % SEGMENTS.length];
      const c: V3 = [-90 + 60 * (n % 4), -60 + 40 * Math.floor(n / 4), 10 * (n % 3)];
      const mm = Math.max(6, 12 + 3 * (n % 5) + (k < 3 ? -k : 2 * (k - 3)));
      const alert = n % 3 === 0;
      const l = lesion(`L${lesions.length + 1}`, c, n === 5 ? null : seg, mm, alert ? (n % 2 ? 0 : 4.5) : 22, alert ? 'VIII' : 'V');
      if (o.viable) l.viableAxialMm = Math.round(mm * 5) / 10;
      lesions.push(l);
    }
    const analysis: VisitAnalysis = {
      segments: SEGMENTS.map((s, i) => ({ segment: s, volumeMl: 200 + 10 * i })),
      liverVolumeMl: 1800,
      lesions,
      warnings: [],
    };
    return { id: `v${k + 1}`, date, analysis, warnings: k === 1 ? [`${o.id ?? 'SYN-0001'}/v2/segments.nii.gz: label value 12 not in the segment scheme; 40 voxels read as background`] : [] };
  });
  const manifest: Manifest = {
    patient: { id: o.id ?? 'SYN-0001', birthYear: 1950, heightCm: 170, weightKg: 70, sex: 'female' },
    marginMm: 10,
    ...(o.viable ? { criteria: 'mRECIST' as const } : {}),
    visits: visits.map((v) => ({ id: v.id, date: v.date, scan: `${v.id}/scan.nii.gz`, segments: `${v.id}/segments.nii.gz`, lesions: `${v.id}/lesions.nii.gz` })),
    treatments: [
      { date: dates[0], kind: 'therapy-start', label: o.oddTreatment ? 'FOLFOX, "cycle 1" <b>&' : 'First-line chemotherapy' },
    ],
  };
  const followup = runFollowup(
    visits.map((v) => ({ id: v.id, date: v.date, lesions: v.analysis.lesions, sliceThicknessMm: 2 })),
    { marginMm: 10, ...(o.viable ? { criteria: 'mRECIST' as const } : {}) },
  );
  const last = visits[visits.length - 1];
  const volumetry: VisitVolumetry = {
    liverVolumeMl: 1800, tumourVolumeMl: 40, tumourFreeLiverMl: 1760, tumourOutsideSegmentsMl: 0, tumourFrom: 'lesion mask', estimated: false,
    segments: last.analysis.segments.map((s) => ({ segment: s.segment, volumeMl: s.volumeMl, tumourMl: 4, tumourFreeMl: s.volumeMl - 4 })),
    notes: [],
  };
  const remnant = o.remnant
    ? remnantForPatient(manifest, { id: last.id, date: last.date, volumetry, lesions: last.analysis.lesions }, { resection: { preset: 'right-hemihepatectomy' }, tracks: followup.tracks })
    : null;
  return { manifest, visits, followup, remnant };
}
