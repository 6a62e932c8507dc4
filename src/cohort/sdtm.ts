import { decimal, type CaseFormRow } from '../report/case-form.js';
import type { PatientResult, VisitResponseRecord } from './result.js';

/**
 * A patient's tumour data in the CDISC SDTM layout: TU (tumour identification), TR (tumour results),
 * RS (disease response) and SUPPTU (the Couinaud segment, which has no standard TU variable).
 * Variable names, test codes and controlled terms follow the SDTM Implementation Guide v3.4 and its
 * oncology domains section 6.3.14 (TU), 6.3.15 (TR), 6.3.16 (RS) — all from memory, not checked
 * against the document: TUTESTCD TUMIDENT; TRTESTCD LDIAM, SUMDIAM, TUMSTATE; RSTESTCD OVRLRESP,
 * TRGRESP, NTRGRESP, NEWLPROG; responses CR, PR, SD, PD, NE, NON-CR/NON-PD.
 *
 * Choices: one TU record per lesion track, at the visit where it was first seen (TARGET or NON-TARGET
 * at baseline, NEW after); target tracks get LDIAM at every visit with the diameter RECIST records
 * (0 when gone, not done when not evaluable), other tracks TUMSTATE PRESENT or ABSENT; SUMDIAM per
 * visit when there are targets; RS for every visit after baseline. VISITNUM is the visit's place in
 * the patient's series (1 = baseline); VISIT is the manifest's visit id; dates are ISO 8601.
 */
export const TU_COLUMNS = [
  'STUDYID', 'DOMAIN', 'USUBJID', 'TUSEQ', 'TULNKID', 'TUTESTCD', 'TUTEST', 'TUORRES', 'TUSTRESC', 'TULOC',
  'VISITNUM', 'VISIT', 'TUDTC',
] as const;
export const TR_COLUMNS = [
  'STUDYID', 'DOMAIN', 'USUBJID', 'TRSEQ', 'TRGRPID', 'TRLNKID', 'TRTESTCD', 'TRTEST', 'TRORRES', 'TRORRESU',
  'TRSTRESC', 'TRSTRESN', 'TRSTRESU', 'TRSTAT', 'TRREASND', 'VISITNUM', 'VISIT', 'TRDTC',
] as const;
export const RS_COLUMNS = [
  'STUDYID', 'DOMAIN', 'USUBJID', 'RSSEQ', 'RSTESTCD', 'RSTEST', 'RSCAT', 'RSORRES', 'RSSTRESC', 'VISITNUM', 'VISIT', 'RSDTC',
] as const;
export const SUPPTU_COLUMNS = ['STUDYID', 'RDOMAIN', 'USUBJID', 'IDVAR', 'IDVARVAL', 'QNAM', 'QLABEL', 'QVAL', 'QORIG'] as const;

export type TuRow = Record<(typeof TU_COLUMNS)[number], string>;
export type TrRow = Record<(typeof TR_COLUMNS)[number], string>;
export type RsRow = Record<(typeof RS_COLUMNS)[number], string>;
export type SuppTuRow = Record<(typeof SUPPTU_COLUMNS)[number], string>;

export interface SdtmTables {
  tu: TuRow[];
  tr: TrRow[];
  rs: RsRow[];
  supptu: SuppTuRow[];
}

/** The response categories as the RS controlled terms spell them. */
const RESPONSE_TERM: Record<string, string> = {
  CR: 'CR', PR: 'PR', SD: 'SD', PD: 'PD', NE: 'NE', 'non-CR/non-PD': 'NON-CR/NON-PD',
};

type Role = 'TARGET' | 'NON-TARGET' | 'NEW';

interface Track {
  id: string;
  role: Role;
  firstVisit: string;
  segment: string;
}

/** USUBJID: the study id and the patient id, joined as is common practice. */
export function usubjid(studyId: string, patient: string): string {
  return `${studyId}-${patient}`;
}

export function emptySdtm(): SdtmTables {
  return { tu: [], tr: [], rs: [], supptu: [] };
}

/** Appends one finished patient's records to the tables. */
export function addPatientSdtm(tables: SdtmTables, studyId: string, result: PatientResult): void {
  if (result.status !== 'done' || result.patient === null) return;
  const subject = usubjid(studyId, result.patient);
  const visits = result.responses;
  const visitNum = new Map(visits.map((v, k) => [v.visit, String(k + 1)]));
  const baseline = visits[0]?.visit;
  const common = { STUDYID: studyId, USUBJID: subject };
  const at = (v: { visit: string; date: string }) => ({ VISITNUM: visitNum.get(v.visit) ?? '', VISIT: v.visit });

  const tracks = new Map<string, Track>();
  for (const row of result.caseForm) {
    if (row.track === '' || row.status !== 'present' || tracks.has(row.track)) continue;
    const role: Role = row.visit !== baseline ? 'NEW' : row.target === 'yes' ? 'TARGET' : 'NON-TARGET';
    tracks.set(row.track, { id: row.track, role, firstVisit: row.visit, segment: row.segment });
  }

  let tuSeq = 0;
  for (const t of tracks.values()) {
    const v = visits.find((x) => x.visit === t.firstVisit);
    if (!v) continue;
    tuSeq++;
    tables.tu.push({
      ...common, DOMAIN: 'TU', TUSEQ: String(tuSeq), TULNKID: t.id, TUTESTCD: 'TUMIDENT', TUTEST: 'Tumor Identification',
      TUORRES: t.role, TUSTRESC: t.role, TULOC: 'LIVER', ...at(v), TUDTC: v.date,
    });
    tables.supptu.push({
      STUDYID: studyId, RDOMAIN: 'TU', USUBJID: subject, IDVAR: 'TUSEQ', IDVARVAL: String(tuSeq),
      QNAM: 'TUSEGMNT', QLABEL: 'Couinaud Segment', QVAL: t.segment, QORIG: 'DERIVED',
    });
  }

  let trSeq = 0;
  const tr = (v: VisitResponseRecord, fields: Partial<TrRow>) => {
    trSeq++;
    tables.tr.push({
      ...common, DOMAIN: 'TR', TRSEQ: String(trSeq), TRGRPID: '', TRLNKID: '', TRTESTCD: '', TRTEST: '', TRORRES: '', TRORRESU: '',
      TRSTRESC: '', TRSTRESN: '', TRSTRESU: '', TRSTAT: '', TRREASND: '', ...at(v), TRDTC: v.date, ...fields,
    });
  };
  const mm = (x: number) => {
    const s = decimal(x, 1);
    return { TRORRES: s, TRORRESU: 'mm', TRSTRESC: s, TRSTRESN: s, TRSTRESU: 'mm' };
  };
  const notDone = { TRSTAT: 'NOT DONE', TRREASND: 'NOT EVALUABLE' };
  for (const v of visits) {
    const rows = result.caseForm.filter((r) => r.visit === v.visit);
    for (const t of tracks.values()) {
      const status = trackStatus(rows, t.id);
      if (status === null) continue;
      if (t.role === 'TARGET') {
        const recorded = v.targets.find((x) => x.track === t.id)?.recordedMm;
        const base = { TRGRPID: t.role, TRLNKID: t.id, TRTESTCD: 'LDIAM', TRTEST: 'Longest Diameter' };
        tr(v, recorded === null || recorded === undefined ? { ...base, ...notDone } : { ...base, ...mm(recorded) });
      } else {
        const base = { TRGRPID: t.role, TRLNKID: t.id, TRTESTCD: 'TUMSTATE', TRTEST: 'Tumor State' };
        const state = status === 'gone' ? 'ABSENT' : 'PRESENT';
        tr(v, status === 'not-evaluable' ? { ...base, ...notDone } : { ...base, TRORRES: state, TRSTRESC: state });
      }
    }
    if (v.targets.length > 0) {
      const sumRow = rows[0];
      const sum = sumRow ? Number(sumRow.target_sum_mm) : NaN;
      tr(v, { TRGRPID: 'TARGET', TRTESTCD: 'SUMDIAM', TRTEST: 'Sum of Diameters', ...(Number.isFinite(sum) && sumRow.target_sum_mm !== '' ? mm(sum) : notDone) });
    }
  }

  let rsSeq = 0;
  const rs = (v: VisitResponseRecord, code: string, test: string, value: string) => {
    rsSeq++;
    tables.rs.push({
      ...common, DOMAIN: 'RS', RSSEQ: String(rsSeq), RSTESTCD: code, RSTEST: test, RSCAT: v.criteria,
      RSORRES: value, RSSTRESC: value, ...at(v), RSDTC: v.date,
    });
  };
  for (const v of visits) {
    if (v.overall === null) continue;
    if (v.target !== null && v.target !== 'none') rs(v, 'TRGRESP', 'Target Response', RESPONSE_TERM[v.target]);
    if (v.nonTarget !== null && v.nonTarget !== 'none') rs(v, 'NTRGRESP', 'Non-target Response', RESPONSE_TERM[v.nonTarget]);
    rs(v, 'NEWLPROG', 'New Lesion Progression', v.newLesion ? 'Y' : 'N');
    rs(v, 'OVRLRESP', 'Overall Response', RESPONSE_TERM[v.overall]);
  }
}

/** A track's state at a visit from its case-form rows: present, gone, merged, not-evaluable, or not yet seen. */
function trackStatus(rows: readonly CaseFormRow[], track: string): string | null {
  const mine = rows.filter((r) => r.track === track);
  if (mine.length === 0) return null;
  return mine.some((r) => r.status === 'present') ? 'present' : mine[0].status;
}

/**
 * Dataset and variable labels for the XPORT files (SDTMIG v3.4, from memory), and which variables
 * are numeric there (--SEQ, VISITNUM, TRSTRESN); every other variable is character.
 */
export const SDTM_DATASETS = [
  { key: 'tu', name: 'TU', label: 'Tumor/Lesion Identification', columns: TU_COLUMNS },
  { key: 'tr', name: 'TR', label: 'Tumor/Lesion Results', columns: TR_COLUMNS },
  { key: 'rs', name: 'RS', label: 'Disease Response and Clin Classification', columns: RS_COLUMNS },
  { key: 'supptu', name: 'SUPPTU', label: 'Supplemental Qualifiers for TU', columns: SUPPTU_COLUMNS },
] as const;

export const SDTM_NUMERIC = new Set(['TUSEQ', 'TRSEQ', 'RSSEQ', 'VISITNUM', 'TRSTRESN']);

export const SDTM_LABELS: Record<string, string> = {
  STUDYID: 'Study Identifier', DOMAIN: 'Domain Abbreviation', USUBJID: 'Unique Subject Identifier',
  VISITNUM: 'Visit Number', VISIT: 'Visit Name',
  TUSEQ: 'Sequence Number', TULNKID: 'Link ID', TUTESTCD: 'Tumor/Lesion ID Short Name', TUTEST: 'Tumor/Lesion ID Test Name',
  TUORRES: 'Tumor/Lesion ID Result', TUSTRESC: 'Tumor/Lesion ID Result Std. Format', TULOC: 'Location of the Tumor/Lesion',
  TUDTC: 'Date/Time of Tumor/Lesion Identification',
  TRSEQ: 'Sequence Number', TRGRPID: 'Group ID', TRLNKID: 'Link ID', TRTESTCD: 'Tumor/Lesion Assessment Short Name',
  TRTEST: 'Tumor/Lesion Assessment Test Name', TRORRES: 'Result or Finding in Original Units', TRORRESU: 'Original Units',
  TRSTRESC: 'Character Result/Finding in Std Format', TRSTRESN: 'Numeric Result/Finding in Standard Units',
  TRSTRESU: 'Standard Units', TRSTAT: 'Completion Status', TRREASND: 'Reason Not Done', TRDTC: 'Date/Time of Tumor/Lesion Measurement',
  RSSEQ: 'Sequence Number', RSTESTCD: 'Assessment Short Name', RSTEST: 'Assessment Name', RSCAT: 'Category for Assessment',
  RSORRES: 'Result or Finding in Original Units', RSSTRESC: 'Character Result/Finding in Std Format', RSDTC: 'Date/Time of Assessment',
  RDOMAIN: 'Related Domain Abbreviation', IDVAR: 'Identifying Variable', IDVARVAL: 'Identifying Variable Value',
  QNAM: 'Qualifier Variable Name', QLABEL: 'Qualifier Variable Label', QVAL: 'Data Value', QORIG: 'Origin',
};
