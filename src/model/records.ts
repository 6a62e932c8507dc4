import type { VisitReaderCalls } from '../followup/reader-calls.js';
import type { Manifest, ProposedResection } from '../manifest/manifest.js';
import { DEFAULT_MAX_LESIONS } from '../lesions/components.js';
import type { Datatype } from '../volume/volume.js';

/**
 * What the local store keeps, as plain data. The renderer's Dexie tables hold exactly these shapes,
 * and a backup file carries them as JSON, so every field must survive JSON unchanged: strings,
 * finite numbers, booleans, null, arrays and plain objects; volume bytes are the one exception.
 */

/** Any value JSON carries exactly. */
export type JsonValue = string | number | boolean | null | JsonValue[] | { [key: string]: JsonValue };

/** Roles a NIfTI volume plays in a visit (the manifest's field names). */
export const VOLUME_ROLES = ['scan', 'segments', 'liver', 'caudate', 'lesions', 'viable'] as const;
export type VolumeRole = (typeof VOLUME_ROLES)[number];

/** JSON inputs of a visit, kept as the text that was imported. */
export const INPUT_KINDS = ['landmarks', 'marks', 'scheme'] as const;
export type InputKind = (typeof INPUT_KINDS)[number];

export interface PatientRecord {
  id: string;
  label?: string;
  birthYear?: number;
  heightCm?: number;
  weightKg?: number;
  sex?: 'female' | 'male' | 'other';
  /** An invented demo patient. */
  demo?: boolean;
  marginMm: number;
  criteria?: 'RECIST 1.1' | 'mRECIST';
  targets?: string[];
  /** The resection proposed at the tumour board (a Brisbane 2000 preset or the segments to remove). */
  resection?: ProposedResection;
  /** Protocol settings of the response rules (manifest `protocol`). */
  protocol?: Manifest['protocol'];
  /** ISO time the patient was first stored. */
  createdAt: string;
  /** Folder or file names the patient was imported from, for the nurse's own records. */
  importedFrom?: string;
}

export interface VisitRecord {
  patientId: string;
  id: string;
  /** ISO date of the imaging. */
  date: string;
  /** Roles with a stored volume, in VOLUME_ROLES order. */
  volumes: VolumeRole[];
  /** Kinds with a stored JSON input, in INPUT_KINDS order. */
  inputs: InputKind[];
  /** `default`, or `file` when the visit's own scheme is among its inputs. */
  scheme?: 'default' | 'file';
  splitIV?: boolean;
  note?: string;
  /** Header facts when the scan was imported from a DICOM series (its voxels are stored as NIfTI). */
  dicom?: DicomVisitFacts;
  /** The reader's calls at this visit (manifest visit `reader`). */
  readerCalls?: VisitReaderCalls;
  /** Bytes the visit takes in the store (its records' JSON plus compressed volumes); schema 2 on. */
  storedBytes: number;
}

/** A DICOM scan's header facts kept with its visit; no patient name or birth date is stored. */
export interface DicomVisitFacts {
  seriesUid: string;
  studyDate?: string;
  modality?: string;
  seriesDescription?: string;
  sliceThicknessMm?: number;
  contrastAgent?: string;
  kvp?: number;
  manufacturerModel?: string;
}

/** One NIfTI file of a visit, always gzip-compressed; the only table that holds voxel data. */
export interface VolumeRecord {
  /** `${patientId}/${visitId}/${role}`. */
  key: string;
  patientId: string;
  visitId: string;
  role: VolumeRole;
  fileName: string;
  /** The .nii.gz bytes as imported (a plain .nii is gzipped on import). */
  bytes: Uint8Array;
  /** All dimensions of the file. */
  dims: number[];
  /** Voxel to world RAS mm, row-major 16 numbers. */
  affine: number[];
  datatype: Datatype;
  /** Bytes of the first 3-D volume once decoded, so a viewer can budget memory before loading. */
  volumeBytes: number;
  /** Size of the file as it was imported. */
  importedBytes: number;
}

export interface InputRecord {
  /** `${patientId}/${visitId}/${kind}`. */
  key: string;
  patientId: string;
  visitId: string;
  kind: InputKind;
  fileName: string;
  text: string;
}

/** One lesion of one visit as the analysis found it (written by the analysis step). */
export interface LesionRecord {
  /** `${patientId}/${visitId}/${id}`. */
  key: string;
  patientId: string;
  visitId: string;
  id: string;
  source: 'mask' | 'marks';
  centroidMm: [number, number, number];
  segment: string | null;
  segmentFractions?: Record<string, number>;
  volumeMl?: number;
  longestAxialMm: number;
  shortAxisMm: number;
  marginMm: number | null;
  nearestOtherSegment: string | null;
  marginAlert: boolean;
}

/** The same lesion followed over visits: visit id → lesion id. */
export interface TrackRecord {
  /** `${patientId}/${id}`. */
  key: string;
  patientId: string;
  id: string;
  lesions: Record<string, string>;
  target: boolean;
}

/** A reader's correction of the automatic lesion matching. */
export interface OverrideRecord {
  id: string;
  patientId: string;
  kind: 'link' | 'unlink' | 'new';
  visit: string;
  lesion: string;
  track?: string;
  at: string;
}

export interface TreatmentRecord {
  patientId: string;
  id: string;
  date: string;
  kind: 'therapy-start' | 'therapy-end' | 'ablation' | 'resection' | 'embolisation' | 'other';
  label: string;
}

export interface WindowPreset {
  name: string;
  /** Window centre and width in the scan's units (HU for CT). */
  centre: number;
  width: number;
}

export interface SettingRecord {
  key: string;
  value: JsonValue;
}

/** The settings the app knows, with their values before anyone changes them. */
export const DEFAULT_SETTINGS: {
  marginMm: number; windowPresets: WindowPreset[]; demoOffered: boolean; readerName: string; maxLesions: number; pseudonymKey: string;
} = {
  marginMm: 10,
  // Lesions per visit above which a mask is refused, naming the file and the count (the command line's --max-lesions).
  maxLesions: DEFAULT_MAX_LESIONS,
  // The key of keyed pseudonyms on exports; kept on this computer only, never in a backup, an export or the trail.
  pseudonymKey: '',
  // Who is reading on this computer: set once in the app, written on every trail entry and the case form.
  readerName: '',
  // Set once the demo patients were offered on first start, so removing them is final.
  demoOffered: false,
  // Liver soft-tissue, bone and lung windows as commonly used in CT reading (common practice).
  windowPresets: [
    { name: 'Liver', centre: 60, width: 160 },
    { name: 'Abdomen', centre: 40, width: 400 },
    { name: 'Bone', centre: 400, width: 1800 },
  ],
};

/** Settings that stay on this computer: left out of backups, and their values left out of the edit trail. */
export const PRIVATE_SETTINGS: readonly string[] = ['pseudonymKey'];

export type AuditEntity = 'patient' | 'visit' | 'lesion' | 'track' | 'override' | 'treatment' | 'setting';
export type AuditAction = 'create' | 'update' | 'delete' | 'import' | 'restore';

/** One line of the edit trail: what changed, when, from what to what (a desktop without logins has no "who"). */
export interface AuditRecord {
  /** Time, counter and a random tail: sorts in the order edits were made, never collides with a restored backup's. */
  id: string;
  at: string;
  patientId?: string;
  entity: AuditEntity;
  entityId: string;
  field: string;
  oldValue: JsonValue;
  newValue: JsonValue;
  action: AuditAction;
  /** The reader name set in the app when the change was made; absent when none was set. */
  by?: string;
}

/** Record shapes by table name, as stored. */
export interface StoreTables {
  patients: PatientRecord;
  visits: VisitRecord;
  volumes: VolumeRecord;
  inputs: InputRecord;
  lesions: LesionRecord;
  tracks: TrackRecord;
  overrides: OverrideRecord;
  treatments: TreatmentRecord;
  settings: SettingRecord;
  audit: AuditRecord;
}
export type TableName = keyof StoreTables;

export const TABLE_NAMES: readonly TableName[] = [
  'patients', 'visits', 'volumes', 'inputs', 'lesions', 'tracks', 'overrides', 'treatments', 'settings', 'audit',
];

export const volumeKey = (patientId: string, visitId: string, role: VolumeRole) => `${patientId}/${visitId}/${role}`;
export const inputKey = (patientId: string, visitId: string, kind: InputKind) => `${patientId}/${visitId}/${kind}`;
