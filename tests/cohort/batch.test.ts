import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateCohort } from '../../demo-data/cohort.js';

// `falciform batch DIR --out DIR` over a cohort of invented patients (demo-data/cohort.ts), one of
// them with a scan cut short. The batch's rows are checked against `falciform report` and
// `falciform followup --json` run per patient, its resume against a batch killed midway, and its
// SDTM tables against the CDISC SDTM Implementation Guide v3.4, tumour domains TU/TR/RS
// (variable names and controlled terms from memory, not checked against the document).

const COUNT = 6;
const BROKEN = 'site-b/C-0006/manifest.json';
const TABLES = ['case-form.csv', 'status.csv', 'sdtm/tu.csv', 'sdtm/tr.csv', 'sdtm/rs.csv', 'sdtm/supptu.csv'];

function falciform(...args: string[]) {
  return spawnSync(process.execPath, ['bin/falciform.js', ...args], { encoding: 'utf8' });
}

type Row = Record<string, string>;
const csv = (path: string): Row[] => parse(readFileSync(path, 'utf8'), { columns: true }) as Row[];
const tables = (out: string) => Object.fromEntries(TABLES.map((t) => [t, readFileSync(join(out, t), 'utf8')]));

let dir: string;
let cohort: string;
let manifests: string[];

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'falciform-batch-'));
  cohort = join(dir, 'cohort');
  manifests = await generateCohort(cohort, COUNT, { broken: true });
}, 120_000);

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('falciform batch', () => {
  let first: string;

  it('runs every patient, records the broken one with its reason, and exits 0', () => {
    first = join(dir, 'out-1');
    const r = falciform('batch', cohort, '--out', first, '--jobs', '2', '--study', 'TEST01');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/batch: 6\/6 patients, 5 done, 0 unchanged, 1 failed/);
    const status = csv(join(first, 'status.csv'));
    expect(status.map((s) => s.manifest)).toEqual([...manifests].sort());
    const broken = status.find((s) => s.manifest === BROKEN)!;
    expect(broken.status).toBe('failed');
    expect(broken.reason).toContain(join(cohort, 'site-b/C-0006/v2/scan.nii.gz'));
    expect(status.filter((s) => s.status === 'done')).toHaveLength(COUNT - 1);
    expect(readFileSync(join(first, 'README.txt'), 'utf8')).toContain('not a medical device');
  }, 180_000);

  it("gives each patient the rows `falciform report` writes for it alone", () => {
    const cohortRows = csv(join(first, 'case-form.csv'));
    let compared = 0;
    for (const m of manifests.filter((x) => x !== BROKEN)) {
      const out = join(dir, 'single', m);
      const r = falciform('report', join(cohort, m), '--out', out, '--no-pdf');
      expect(r.status, r.stderr).toBe(0);
      const single = csv(join(out, 'case-form.csv'));
      expect(single.length).toBeGreaterThan(0);
      expect(cohortRows.filter((row) => row.patient === single[0].patient)).toEqual(single);
      compared += single.length;
    }
    expect(cohortRows).toHaveLength(compared);
  }, 180_000);

  it('writes the SDTM tumour domains with the guide’s variable names, controlled terms and the follow-up’s responses', () => {
    const tu = csv(join(first, 'sdtm/tu.csv'));
    const tr = csv(join(first, 'sdtm/tr.csv'));
    const rs = csv(join(first, 'sdtm/rs.csv'));
    // Required and expected variables (SDTMIG v3.4 TU/TR/RS, from memory).
    for (const v of ['STUDYID', 'DOMAIN', 'USUBJID', 'TUSEQ', 'TULNKID', 'TUTESTCD', 'TUTEST', 'TUORRES', 'TUSTRESC', 'TULOC', 'VISITNUM', 'TUDTC']) expect(Object.keys(tu[0])).toContain(v);
    for (const v of ['STUDYID', 'DOMAIN', 'USUBJID', 'TRSEQ', 'TRGRPID', 'TRLNKID', 'TRTESTCD', 'TRTEST', 'TRORRES', 'TRORRESU', 'TRSTRESC', 'TRSTRESN', 'TRSTRESU', 'TRSTAT', 'TRREASND', 'VISITNUM', 'TRDTC']) expect(Object.keys(tr[0])).toContain(v);
    for (const v of ['STUDYID', 'DOMAIN', 'USUBJID', 'RSSEQ', 'RSTESTCD', 'RSTEST', 'RSCAT', 'RSORRES', 'RSSTRESC', 'VISITNUM', 'RSDTC']) expect(Object.keys(rs[0])).toContain(v);
    expect(new Set(tu.map((r) => r.DOMAIN))).toEqual(new Set(['TU']));
    expect(new Set(tu.map((r) => r.TUTESTCD))).toEqual(new Set(['TUMIDENT']));
    for (const r of tu) expect(['TARGET', 'NON-TARGET', 'NEW']).toContain(r.TUORRES);
    for (const r of tr) expect(['LDIAM', 'SUMDIAM', 'TUMSTATE']).toContain(r.TRTESTCD);
    for (const r of rs) expect(['OVRLRESP', 'TRGRESP', 'NTRGRESP', 'NEWLPROG']).toContain(r.RSTESTCD);
    // RSORRES controlled terms for the response values (RECIST 1.1 categories; NON-CR/NON-PD for non-target disease).
    for (const r of rs.filter((x) => x.RSTESTCD !== 'NEWLPROG')) expect(['CR', 'PR', 'SD', 'PD', 'NE', 'NON-CR/NON-PD']).toContain(r.RSORRES);
    for (const r of rs.filter((x) => x.RSTESTCD === 'NEWLPROG')) expect(['Y', 'N']).toContain(r.RSORRES);
    // --SEQ numbers each subject's records 1, 2, 3, … within a domain.
    for (const [rows, seq] of [[tu, 'TUSEQ'], [tr, 'TRSEQ'], [rs, 'RSSEQ']] as const) {
      const bySubject = new Map<string, number[]>();
      for (const r of rows) bySubject.set(r.USUBJID, [...(bySubject.get(r.USUBJID) ?? []), Number(r[seq])]);
      for (const s of bySubject.values()) expect(s).toEqual(s.map((_, n) => n + 1));
    }
    // Every TR record of a lesion links to its TU record.
    const tuKeys = new Set(tu.map((r) => `${r.USUBJID}/${r.TULNKID}`));
    // TU link ids are the lettered track ids (A, B, …), never a number that reads as a target's rank.
    for (const r of tu) expect(r.TULNKID).toMatch(/^[A-Z]+$/);
    for (const r of tr.filter((x) => x.TRLNKID !== '')) expect(tuKeys.has(`${r.USUBJID}/${r.TRLNKID}`)).toBe(true);
    // SUMDIAM is the sum of the targets' LDIAM at the visit (RECIST 1.1 section 4.3.2, sum of diameters).
    for (const sum of tr.filter((x) => x.TRTESTCD === 'SUMDIAM' && x.TRSTAT === '')) {
      const parts = tr.filter((x) => x.USUBJID === sum.USUBJID && x.VISITNUM === sum.VISITNUM && x.TRTESTCD === 'LDIAM');
      expect(parts.length).toBeGreaterThan(0);
      expect(Number(sum.TRSTRESN)).toBeCloseTo(parts.reduce((a, p) => a + Number(p.TRSTRESN), 0), 6);
      expect(sum.TRORRESU).toBe('mm');
    }
    // OVRLRESP is the overall response at each visit after baseline: as `falciform followup --json` gives it
    // (one patient), and as each patient's own case form (written by `falciform report` above) records it.
    const one = manifests[0];
    const f = JSON.parse(falciform('followup', join(cohort, one), '--json').stdout) as { patient: { id: string }; visits: { id: string; overall: string | null }[] };
    const term = (x: string | null) => (x === 'non-CR/non-PD' ? 'NON-CR/NON-PD' : x);
    const overall = (id: string) => rs.filter((r) => r.USUBJID === `TEST01-${id}` && r.RSTESTCD === 'OVRLRESP');
    expect(overall(f.patient.id).map((r) => [r.VISIT, r.VISITNUM, r.RSORRES])).toEqual(f.visits.slice(1).map((v, k) => [v.id, String(k + 2), term(v.overall)]));
    for (const m of manifests.filter((x) => x !== BROKEN)) {
      const single = csv(join(dir, 'single', m, 'case-form.csv'));
      const visits = [...new Map(single.filter((r) => r.days_from_baseline !== '0').map((r) => [r.visit, term(r.response)])).entries()];
      expect(overall(single[0].patient).map((r) => [r.VISIT, r.RSORRES])).toEqual(visits);
    }
  }, 120_000);

  it('writes each SDTM table as SAS XPORT v5 too, read back by pandas (python3-pandas) with the CSV’s rows', () => {
    for (const name of ['tu', 'tr', 'rs', 'supptu']) {
      const rows = csv(join(first, `sdtm/${name}.csv`));
      const r = spawnSync('/usr/bin/python3', ['tests/reference/xport_read.py', join(first, `sdtm/${name}.xpt`)], { encoding: 'utf8' });
      expect(r.status, r.stderr).toBe(0);
      const got = JSON.parse(r.stdout) as { name: string; variables: { name: string; type: string }[]; rows: (string | number | null)[][] };
      expect(got.name).toBe(name.toUpperCase());
      expect(got.variables.map((v) => v.name)).toEqual(Object.keys(rows[0]));
      const asCsv = got.rows.map((row) =>
        Object.fromEntries(got.variables.map((v, k) => [v.name, row[k] === null ? '' : v.type === 'numeric' ? String(row[k]) : String(row[k])])),
      );
      expect(asCsv).toEqual(rows);
    }
  }, 60_000);

  it('reruns only what changed: finished patients with unchanged inputs are skipped, a changed one is recomputed', () => {
    const out = join(dir, 'out-rerun');
    cpSync(first, out, { recursive: true });
    const changed = manifests.find((m) => m !== BROKEN)!;
    const again = falciform('batch', cohort, '--out', out, '--jobs', '2', '--study', 'TEST01');
    expect(again.status, again.stderr).toBe(0);
    const status = csv(join(out, 'status.csv'));
    expect(status.filter((s) => s.status === 'unchanged')).toHaveLength(COUNT - 1);
    expect(status.find((s) => s.manifest === BROKEN)!.status).toBe('failed');
    for (const t of TABLES.filter((x) => x !== 'status.csv')) expect(readFileSync(join(out, t), 'utf8')).toBe(tables(first)[t]);

    const path = join(cohort, changed);
    const original = readFileSync(path, 'utf8');
    try {
      writeFileSync(path, original.replace('"marginMm": 10', '"marginMm": 12'));
      const third = falciform('batch', cohort, '--out', out, '--jobs', '2', '--study', 'TEST01');
      expect(third.status, third.stderr).toBe(0);
      const s3 = csv(join(out, 'status.csv'));
      expect(s3.find((s) => s.manifest === changed)!.status).toBe('done');
      expect(s3.filter((s) => s.status === 'unchanged')).toHaveLength(COUNT - 2);
      const rows = csv(join(out, 'case-form.csv')).filter((r) => r.patient === 'C-0001');
      expect(new Set(rows.map((r) => r.set_margin_mm))).toEqual(new Set(['12']));
    } finally {
      writeFileSync(path, original);
    }
  }, 180_000);

  it('resumes a batch killed midway: same tables, only the unfinished patients computed', async () => {
    const out = join(dir, 'out-killed');
    const child = spawn(process.execPath, ['bin/falciform.js', 'batch', cohort, '--out', out, '--jobs', '1', '--study', 'TEST01'], { stdio: 'ignore' });
    const results = join(out, 'patients');
    const finished = () => (existsSync(results) ? readdirSync(results).filter((n) => n.endsWith('.json') && !n.startsWith('.')) : []);
    const deadline = Date.now() + 120_000;
    while (finished().length < 2 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
    child.kill('SIGKILL');
    await new Promise((r) => child.on('exit', r));
    const before = finished().map((n) => decodeURIComponent(n.slice(0, -'.json'.length)));
    expect(before.length).toBeGreaterThanOrEqual(2);
    expect(before.length).toBeLessThan(COUNT);
    expect(existsSync(join(out, 'case-form.csv'))).toBe(false);

    const r = falciform('batch', cohort, '--out', out, '--jobs', '2', '--study', 'TEST01');
    expect(r.status, r.stderr).toBe(0);
    const status = csv(join(out, 'status.csv'));
    for (const s of status) {
      const expected = s.manifest === BROKEN ? 'failed' : before.includes(s.manifest) ? 'unchanged' : 'done';
      expect([s.manifest, s.status]).toEqual([s.manifest, expected]);
    }
    const a = tables(first), b = tables(out);
    for (const t of TABLES.filter((x) => x !== 'status.csv')) expect(b[t]).toBe(a[t]);
  }, 180_000);

  it('refuses K >= N and an empty folder, with the contract’s exit codes', () => {
    const r = falciform('batch', cohort, '--out', join(dir, 'x'), '--shard', '3/3');
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('K runs from 0 to N-1');
    expect(falciform('batch', cohort, '--out', join(dir, 'x'), '--shard', '0/2', '--merge-only').status).toBe(2);
    const empty = mkdtempSync(join(dir, 'empty-'));
    const e = falciform('batch', empty, '--out', join(dir, 'y'));
    expect(e.status).toBe(3);
    expect(e.stderr.trim().split('\n')).toHaveLength(1);
    expect(e.stderr).toContain(`${empty}: holds no manifest.json`);
  });
});
