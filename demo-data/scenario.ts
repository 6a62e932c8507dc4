/**
 * The invented demo scenario: three patients, each with a few visits. Positions are in a body frame
 * (RAS mm, +x towards the patient's right, origin near the portal bifurcation); each visit places the
 * body in the scanner with its own small rigid motion. Lesion diameters are per visit (0 = gone).
 * Every name, date and number here is made up for the demo.
 */
import type { VisitReaderCalls } from '../src/followup/reader-calls.js';
import type { Vec3 } from '../src/geometry/mat4.js';

export interface DemoLesion {
  key: string;
  /** The segment the design puts it in (checked by the generator against the plane rule). */
  segment: string;
  /** Centre per visit in the body frame; one entry means it stays put. */
  centres: Vec3[];
  /** Longest diameter per visit, mm (0 = not present). The lesion is a slightly flattened ellipsoid. */
  diametersMm: number[];
  /** Viable (enhancing) part per visit for mRECIST, mm; omitted when not assessed. */
  viableMm?: number[];
  /** Hounsfield value inside. */
  hu: number;
}

export interface DemoVisit {
  id: string;
  date: string;
  /** How the visit's inputs are given. */
  segmentsFrom: 'map' | 'landmarks';
  lesionsFrom: 'mask' | 'labels' | 'marks';
  /** Rigid motion of the body for this visit: rotations about z and x (degrees), translation (mm). */
  motion: { rotZDeg: number; rotXDeg: number; shiftMm: Vec3 };
  /** The reader's calls written into the manifest (Falciform assesses only the liver). */
  readerCalls?: VisitReaderCalls;
}

export interface DemoPatient {
  id: string;
  title: string;
  story: string;
  birthYear: number;
  heightCm: number;
  weightKg: number;
  sex: 'female' | 'male';
  criteria: 'RECIST 1.1' | 'mRECIST';
  /** Liver tissue value (cirrhotic livers are given a lower, coarser value). */
  liverHu: number;
  noiseHu: number;
  /** Scanner grid: voxel size (mm) and whether x is stored right-to-left (as many DICOM conversions do). */
  spacingMm: Vec3;
  flipX: boolean;
  tiltDeg: number;
  visits: DemoVisit[];
  lesions: DemoLesion[];
  treatments: { date: string; kind: 'therapy-start' | 'therapy-end' | 'ablation' | 'resection' | 'embolisation' | 'other'; label: string }[];
}

export const SEED = 20261202;

export const patients: DemoPatient[] = [
  {
    id: 'DEMO-0001',
    title: 'Metastases responding to chemotherapy',
    story:
      'Three colorectal metastases at baseline (VII, V, II). Chemotherapy from late January; the two targets ' +
      'shrink by more than 30% by the second visit (partial response) and keep shrinking.',
    birthYear: 1958, heightCm: 176, weightKg: 82, sex: 'male',
    criteria: 'RECIST 1.1',
    liverHu: 105, noiseHu: 12,
    spacingMm: [2.6, 2.6, 5], flipX: false, tiltDeg: 0,
    visits: [
      { id: 'v1', date: '2026-01-12', segmentsFrom: 'map', lesionsFrom: 'mask', motion: { rotZDeg: 0, rotXDeg: 0, shiftMm: [0, 0, 0] } },
      { id: 'v2', date: '2026-03-09', segmentsFrom: 'landmarks', lesionsFrom: 'mask', motion: { rotZDeg: 3, rotXDeg: -1.5, shiftMm: [6, -4, 9] } },
      { id: 'v3', date: '2026-05-04', segmentsFrom: 'map', lesionsFrom: 'marks', motion: { rotZDeg: -2, rotXDeg: 1, shiftMm: [-5, 3, -7] } },
      { id: 'v4', date: '2026-06-29', segmentsFrom: 'landmarks', lesionsFrom: 'marks', motion: { rotZDeg: 1.5, rotXDeg: 2, shiftMm: [3, 5, 11] } },
    ],
    lesions: [
      { key: 'vii', segment: 'VII', centres: [[80, -32, 32]], diametersMm: [30, 20, 16, 14], hu: 45 },
      { key: 'v', segment: 'V', centres: [[45, 30, -28]], diametersMm: [27, 17, 14, 12], hu: 50 },
      { key: 'ii', segment: 'II', centres: [[-75, 25, 26]], diametersMm: [16, 11, 9, 8], hu: 48 },
    ],
    treatments: [{ date: '2026-01-20', kind: 'therapy-start', label: 'First-line chemotherapy' }],
  },
  {
    id: 'DEMO-0002',
    title: 'Hepatocellular carcinoma after ablation, then a new lesion',
    story:
      'Cirrhotic liver with one hepatocellular carcinoma in VIII, ablated in February: no viable tumour ' +
      'afterwards (complete response by mRECIST). A new arterially enhancing lesion appears in VI in July ' +
      '(progression) and grows by October.',
    birthYear: 1953, heightCm: 164, weightKg: 71, sex: 'female',
    criteria: 'mRECIST',
    liverHu: 88, noiseHu: 15,
    spacingMm: [2.5, 2.5, 5], flipX: true, tiltDeg: 0,
    visits: [
      { id: 'v1', date: '2026-02-02', segmentsFrom: 'landmarks', lesionsFrom: 'mask', motion: { rotZDeg: 0, rotXDeg: 0, shiftMm: [0, 0, 0] } },
      // The reader's staging finds no disease outside the liver: without that call a complete response
      // of the liver is PR (RECIST 1.1 table 1, non-targets not all evaluated), and the story is a CR.
      { id: 'v2', date: '2026-04-13', segmentsFrom: 'map', lesionsFrom: 'marks', motion: { rotZDeg: -3, rotXDeg: 1, shiftMm: [-7, 2, 8] }, readerCalls: { outsideLiver: 'none' } },
      { id: 'v3', date: '2026-07-06', segmentsFrom: 'landmarks', lesionsFrom: 'marks', motion: { rotZDeg: 2.5, rotXDeg: -2, shiftMm: [4, -6, -10] } },
      { id: 'v4', date: '2026-10-05', segmentsFrom: 'map', lesionsFrom: 'mask', motion: { rotZDeg: -1, rotXDeg: 0.5, shiftMm: [8, 4, 6] } },
    ],
    lesions: [
      // Before ablation the whole tumour enhances; afterwards the ablation zone is larger and has no viable part.
      { key: 'hcc', segment: 'VIII', centres: [[40, 20, 40]], diametersMm: [26, 31, 29, 28], viableMm: [26, 0, 0, 0], hu: 135 },
      { key: 'new', segment: 'VI', centres: [[75, -28, -28]], diametersMm: [0, 0, 15, 21], viableMm: [0, 0, 15, 21], hu: 140 },
    ],
    treatments: [{ date: '2026-02-16', kind: 'ablation', label: 'Microwave ablation, segment VIII' }],
  },
  {
    id: 'DEMO-0003',
    title: 'A growing lesion moving towards a segment border',
    story:
      'A solitary metastasis in VIII under surveillance grows eccentrically towards the border with VII: ' +
      'more than 10 mm from the border at baseline, within the margin by the second visit and across it ' +
      'by the third, when it has also grown by more than 20% and 5 mm (progression). A small lesion in IVb ' +
      'stays the same.',
    birthYear: 1967, heightCm: 168, weightKg: 64, sex: 'female',
    criteria: 'RECIST 1.1',
    liverHu: 102, noiseHu: 11,
    spacingMm: [2.6, 2.6, 4], flipX: false, tiltDeg: 8,
    visits: [
      { id: 'v1', date: '2026-01-19', segmentsFrom: 'map', lesionsFrom: 'labels', motion: { rotZDeg: 0, rotXDeg: 0, shiftMm: [0, 0, 0] } },
      { id: 'v2', date: '2026-04-20', segmentsFrom: 'landmarks', lesionsFrom: 'labels', motion: { rotZDeg: 2, rotXDeg: 1, shiftMm: [-4, 5, 7] } },
      { id: 'v3', date: '2026-07-20', segmentsFrom: 'map', lesionsFrom: 'labels', motion: { rotZDeg: -2.5, rotXDeg: -1, shiftMm: [5, -3, -8] } },
    ],
    lesions: [
      // Centres are placed relative to the VII/VIII border by the generator (see borderDistancesMm).
      { key: 'border', segment: 'VIII', centres: [[0, 0, 0]], diametersMm: [16, 18, 28], hu: 52 },
      { key: 'ivb', segment: 'IVb', centres: [[-20, 39, -24]], diametersMm: [14, 14, 14], hu: 48 },
    ],
    treatments: [],
  },
];

/** For DEMO-0003's border lesion: distance of its centre from the VII/VIII plane per visit, mm. */
export const borderDistancesMm = [24, 14, 9];
