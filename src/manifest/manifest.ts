import { withoutBom } from '../json-file.js';
import { z } from 'zod';
import { badFile } from '../errors.js';
import { NEW_LESION_CALLS } from '../followup/reader-calls.js';
import { NON_TARGET_CALLS, OUTSIDE_LIVER_CALLS } from '../followup/recist.js';
import { RESECTION_PRESETS } from '../remnant/resections.js';
import { SEGMENT_NAMES } from '../segments/segment-map.js';

// The app's Content-Security-Policy forbids eval; without this zod probes `new Function` and the page logs a violation.
z.config({ jitless: true });

/** An ISO 8601 calendar date (YYYY-MM-DD) that exists. */
export const isoDate = z.string().refine((s) => {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
  const d = new Date(`${s}T00:00:00Z`);
  return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
}, 'must be a real date written YYYY-MM-DD');

const relPath = z.string().min(1, 'must name a file');
const id = z.string().regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$/, 'must be 1–64 letters, digits, ".", "_" or "-"');

/** A reader's calls at a visit (src/followup/reader-calls.ts). */
export const readerCalls = z.strictObject({
  newLesions: z.record(id, z.enum(NEW_LESION_CALLS)).optional(),
  tooSmall: z.array(id).optional(),
  confirmedGone: z.array(z.string().regex(/^([A-Za-z0-9][A-Za-z0-9._-]{0,63}:)?[A-Za-z0-9][A-Za-z0-9._-]{0,63}$/, 'must name a track as "A" or "v1:L2"')).optional(),
  nonTarget: z.enum(NON_TARGET_CALLS).optional(),
  outsideLiver: z.enum(OUTSIDE_LIVER_CALLS).optional(),
});

/** Protocol settings of the response rules (src/followup/protocol.ts); all optional. */
export const protocol = z.strictObject({
  equivocalNewBelowMm: z.number().nonnegative().max(100).optional(),
  mrecistPdFloorMm: z.number().nonnegative().max(50).nullable().optional(),
  confirmResponse: z.boolean().optional(),
  confirmationMinDays: z.number().int().min(1).max(365).optional(),
  sdMinDays: z.number().int().min(0).max(365).optional(),
});

const visitFields = z
  .strictObject({
    id,
    date: isoDate,
    scan: relPath,
    segments: relPath.optional(),
    scheme: z.union([z.literal('default'), relPath]).optional(),
    liver: relPath.optional(),
    /** Instead of `liver`: a point inside the liver (world RAS mm) the liver mask is grown from. */
    liverSeedMm: z.tuple([z.number(), z.number(), z.number()]).optional(),
    landmarks: relPath.optional(),
    caudate: relPath.optional(),
    splitIV: z.boolean().optional(),
    lesions: relPath.optional(),
    marks: relPath.optional(),
    /** Viable (enhancing) tumour mask for mRECIST, on any grid. */
    viable: relPath.optional(),
    note: z.string().max(2000).optional(),
    /** What the case form records of the reading: imaging modality, contrast phase, reader, date read. */
    modality: z.enum(['CT', 'MR']).optional(),
    contrastPhase: z.string().min(1).max(64).optional(),
    reader: z.string().min(1).max(120).optional(),
    readDate: isoDate.optional(),
    readerCalls: readerCalls.optional(),
  });

type VisitFields = z.output<typeof visitFields>;

/** A visit that brings its scan and nothing else yet: the app keeps it until a map and lesions are made in it. */
export function isScanOnly(v: VisitFields): boolean {
  return [v.segments, v.liver, v.liverSeedMm, v.landmarks, v.caudate, v.lesions, v.marks, v.viable].every((x) => x === undefined);
}

function checkVisit(v: VisitFields, ctx: z.RefinementCtx): void {
  const hasMap = v.segments !== undefined;
  const hasPlanes = (v.liver !== undefined || v.liverSeedMm !== undefined) && v.landmarks !== undefined;
  if (v.liver !== undefined && v.liverSeedMm !== undefined) {
    ctx.addIssue({ code: 'custom', message: 'must give "liver" or "liverSeedMm", not both' });
  }
  if (hasMap === hasPlanes) {
    ctx.addIssue({ code: 'custom', message: 'must give either "segments" or both "liver" (or "liverSeedMm") and "landmarks"' });
  }
  // Marks may add to a lesion mask (lesions the mask missed); at least one of them is needed.
  if (v.lesions === undefined && v.marks === undefined) {
    ctx.addIssue({ code: 'custom', message: 'must give "lesions", "marks" or both' });
  }
}

const visit = visitFields.superRefine(checkVisit);
/** As `visit`, and a visit may also bring only its scan (the app's import). */
const visitOrScan = visitFields.superRefine((v, ctx) => {
  if (!isScanOnly(v)) checkVisit(v, ctx);
});

const treatment = z.strictObject({
  date: isoDate,
  kind: z.enum(['therapy-start', 'therapy-end', 'ablation', 'resection', 'embolisation', 'other']),
  label: z.string().min(1).max(200),
});

const presetIds = RESECTION_PRESETS.map((p) => p.id);

/** The resection proposed for this patient: a named preset, or the segments to remove. */
export const resection = z
  .strictObject({
    preset: z.string().refine((s) => presetIds.includes(s), `must be one of ${presetIds.join(', ')}`).optional(),
    segments: z
      .array(z.enum(SEGMENT_NAMES, { error: `must be one of ${SEGMENT_NAMES.join(', ')}` }))
      .min(1, 'must list at least one segment')
      .refine((l) => new Set(l).size === l.length, 'must not repeat a segment')
      .optional(),
  })
  .refine((r) => (r.preset === undefined) !== (r.segments === undefined), 'must give either "preset" or "segments"');

const manifestSchemaOf = (visitSchema: typeof visit) => z
  .strictObject({
    patient: z.strictObject({
      id,
      birthYear: z.number().int().min(1900).max(2100).optional(),
      heightCm: z.number().positive().max(260).optional(),
      weightKg: z.number().positive().max(400).optional(),
      sex: z.enum(['female', 'male', 'other']).optional(),
      demo: z.boolean().optional(),
    }),
    marginMm: z.number().nonnegative().max(100).default(10),
    criteria: z.enum(['RECIST 1.1', 'mRECIST']).optional(),
    visits: z.array(visitSchema).min(1, 'must list at least one visit'),
    targets: z.array(id).max(5).optional(),
    treatments: z.array(treatment).optional(),
    resection: resection.optional(),
    protocol: protocol.optional(),
  })
  .superRefine((m, ctx) => {
    const seen = new Set<string>();
    m.visits.forEach((v, n) => {
      if (seen.has(v.id)) ctx.addIssue({ code: 'custom', path: ['visits', n, 'id'], message: `repeats visit id "${v.id}"` });
      seen.add(v.id);
    });
  });
const manifestSchema = manifestSchemaOf(visit);
const manifestWithScanOnly = manifestSchemaOf(visitOrScan);

export type Manifest = z.output<typeof manifestSchema>;
export type ManifestVisit = Manifest['visits'][number];
export type Treatment = NonNullable<Manifest['treatments']>[number];
export type ProposedResection = NonNullable<Manifest['resection']>;

/**
 * Reads a study manifest; visits come back in date order. Errors name the file and the field.
 * `scanOnly` lets a visit bring only its scan (the app grows its liver and lesions later).
 */
export function parseManifest(text: string, file: string, opts: { scanOnly?: boolean } = {}): Manifest {
  let json: unknown;
  try {
    json = JSON.parse(withoutBom(text));
  } catch (e) {
    throw badFile(file, `is not valid JSON (${(e as Error).message})`);
  }
  const r = (opts.scanOnly ? manifestWithScanOnly : manifestSchema).safeParse(json);
  if (!r.success) throw badFile(file, describeIssue(r.error.issues[0]));
  const visits = [...r.data.visits].sort((a, b) => a.date.localeCompare(b.date));
  return { ...r.data, visits };
}

function describeIssue(issue: z.core.$ZodIssue): string {
  const where = issue.path.length ? issue.path.map((p) => (typeof p === 'number' ? `[${p}]` : `.${String(p)}`)).join('') : '';
  const field = where ? `field ${where.replace(/^\./, '')}` : 'manifest';
  return `${field} ${issue.message}`;
}

/** Joins a manifest-relative path onto the manifest's folder (POSIX separators, as in the manifest). */
export function resolveManifestPath(manifestFile: string, relative: string): string {
  if (relative.startsWith('/') || /^[A-Za-z]:[\\/]/.test(relative)) return relative;
  const slash = Math.max(manifestFile.lastIndexOf('/'), manifestFile.lastIndexOf('\\'));
  return slash < 0 ? relative : `${manifestFile.slice(0, slash + 1)}${relative}`;
}
