import { spawnSync } from 'node:child_process';
import { createHmac } from 'node:crypto';
import { cpSync, existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CAUTION } from '../../src/caution.js';
import { VERSION } from '../../src/version.js';
import { pdfInfo } from './pdf.js';

// `falciform report` as a user runs it on the demo patient DEMO-0001 (after the build). What the
// outputs must hold is taken from `falciform followup --json` on the same manifest; the PDF is read
// back with pdftotext and pdfinfo (Debian's poppler-utils), the CSV with csv-parse (RFC 4180), the
// segment maps with nibabel (Debian's python3-nibabel).
// Paper sizes: ISO 216 A4 = 595 × 842 pt; US Letter = 612 × 792 pt.

const MANIFEST = 'demo-data/DEMO-0001/manifest.json';

interface Followup {
  criteria: string;
  visits: { id: string; date: string; overall: string | null }[];
  tracks: { id: string; lesions: Record<string, string>; segments: Record<string, string | null>; longestAxialMm: Record<string, number>; status: Record<string, string> }[];
}

function falciform(...args: string[]) {
  return spawnSync(process.execPath, ['bin/falciform.js', ...args], { encoding: 'utf8', env: { ...process.env, FALCIFORM_BROWSER: '/usr/bin/chromium' } });
}

const words = (s: string) => s.replace(/\s+/g, ' ').trim();
let dir: string;
let followup: Followup;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'falciform-report-'));
  const f = falciform('followup', MANIFEST, '--json');
  if (f.status !== 0) throw new Error(f.stderr);
  followup = JSON.parse(f.stdout) as Followup;
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('falciform report on DEMO-0001', () => {
  let out: string;
  let run: ReturnType<typeof falciform>;
  beforeAll(() => {
    out = join(dir, 'a4');
    run = falciform('report', MANIFEST, '--out', out);
  });

  it('writes the board summary (HTML and PDF), the case form and one segment map per visit', () => {
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    const files = readdirSync(out).sort();
    expect(files).toEqual(['board-summary.html', 'board-summary.pdf', 'case-form.csv', ...followup.visits.map((v) => `segments-${v.id}.nii.gz`)].sort());
    for (const f of files) expect(run.stdout).toContain(join(out, f));
    expect(run.stdout).toContain(CAUTION);
  });

  it('the PDF is one A4 page holding every track with its lesions and segments, each response, and the caution', () => {
    const pdf = join(out, 'board-summary.pdf');
    const info = pdfInfo(pdf);
    expect(info.pages).toBe(1);
    expect(info.widthPt).toBeCloseTo(595, -0.5);
    expect(info.heightPt).toBeCloseTo(842, -0.5);
    const layout = spawnSync('pdftotext', ['-layout', pdf, '-'], { encoding: 'utf8' }).stdout;
    const lines = layout.split('\n').map(words);
    expect(words(layout)).toContain(CAUTION);
    expect(words(layout)).toContain(`Falciform ${VERSION}`);
    expect(words(layout)).toContain('DEMO-0001');
    for (const t of followup.tracks) {
      // The lesion-table row: track, segment, then each visit's lesion id and diameter.
      const row = lines.find((l) => l.startsWith(`${t.id} `) && /target/.test(l));
      expect(row, `row of ${t.id}`).toBeDefined();
      for (const v of followup.visits) {
        if (t.status[v.id] !== 'present') continue;
        expect(row).toContain(`${t.lesions[v.id]} ${t.longestAxialMm[v.id].toFixed(1)}`);
        expect(row).toContain(` ${t.segments[v.id]} `);
      }
    }
    for (const [k, v] of followup.visits.entries()) {
      // A visit whose map was built from landmarks carries a dagger after its id.
      const row = lines.find((l) => l.startsWith(`${v.id} ${v.date}`) || l.startsWith(`${v.id}† ${v.date}`));
      expect(row, `visit row ${v.id}`).toBeDefined();
      expect(row).toContain(k === 0 ? 'baseline' : ` ${v.overall} `);
    }
    const last = followup.visits[followup.visits.length - 1];
    expect(words(layout)).toContain(`Response at ${last.id} (${last.date}), ${followup.criteria} ${last.overall}`);
  });

  it('the case form read back with csv-parse agrees with falciform followup', () => {
    const text = readFileSync(join(out, 'case-form.csv'), 'utf8');
    expect(text.endsWith('\r\n')).toBe(true);
    const rows = parse(text, { columns: true }) as Record<string, string>[];
    let lesions = 0;
    for (const t of followup.tracks) {
      for (const v of followup.visits) {
        if (t.status[v.id] !== 'present') continue;
        lesions++;
        const r = rows.find((x) => x.visit === v.id && x.lesion === t.lesions[v.id]);
        expect(r).toMatchObject({ patient: 'DEMO-0001', date: v.date, track: t.id, segment: t.segments[v.id], status: 'present', response: v.overall ?? '', criteria: followup.criteria });
        expect(Number(r!.longest_axial_mm)).toBeCloseTo(t.longestAxialMm[v.id], 1);
      }
    }
    expect(rows.filter((r) => r.row_type === 'lesion' && r.status === 'present')).toHaveLength(lesions);
    // Each visit also has its one summary row.
    expect(rows.filter((r) => r.row_type === 'visit').map((r) => r.visit)).toEqual(followup.visits.map((v) => v.id));
    expect(rows.every((r) => r.caution === CAUTION)).toBe(true);
  });

  it('exported segment maps read back by nibabel have the labels and affine of the maps used', () => {
    const manifest = JSON.parse(readFileSync(MANIFEST, 'utf8')) as { visits: { id: string; segments?: string; liver?: string; landmarks?: string; caudate?: string; splitIV?: boolean }[] };
    const base = 'demo-data/DEMO-0001';
    const job = manifest.visits.map((v) => {
      if (v.segments) return { visit: v.id, exported: join(out, `segments-${v.id}.nii.gz`), reference: join(base, v.segments) };
      // A built map: the reference is the same landmark set built by `falciform segments`.
      const reference = join(dir, `built-${v.id}.nii.gz`);
      const args = ['segments', '--liver', join(base, v.liver!), '--landmarks', join(base, v.landmarks!), '--out', reference];
      if (v.caudate) args.push('--caudate', join(base, v.caudate));
      if (v.splitIV) args.push('--split-iv');
      const r = falciform(...args);
      if (r.status !== 0) throw new Error(r.stderr);
      return { visit: v.id, exported: join(out, `segments-${v.id}.nii.gz`), reference, liver: join(base, v.liver!) };
    });
    expect(job.some((j) => 'liver' in j) && job.some((j) => !('liver' in j))).toBe(true);
    const jobFile = join(dir, 'maps.json');
    writeFileSync(jobFile, JSON.stringify(job));
    const py = spawnSync('/usr/bin/python3', ['tests/report/segment_maps.py', jobFile], { encoding: 'utf8' });
    expect(py.stderr).toBe('');
    const results = JSON.parse(py.stdout) as { visit: string; labelsEqual: boolean; maxAffineDiff: number; labels: number[]; sformCode: number; liverMatches?: boolean; liverAffineDiff?: number }[];
    for (const r of results) {
      expect(r.labelsEqual, r.visit).toBe(true);
      expect(r.maxAffineDiff).toBeLessThan(1e-4);
      expect(r.sformCode).toBeGreaterThan(0);
      expect(r.labels.every((x) => Number.isInteger(x) && x >= 0 && x <= 9)).toBe(true);
      if (r.liverMatches !== undefined) {
        // Every liver voxel and nothing else carries a segment label, on the liver mask's own grid.
        expect(r.liverMatches, r.visit).toBe(true);
        expect(r.liverAffineDiff!).toBeLessThan(1e-4);
      }
    }
  });
});

describe('falciform report options and errors', () => {
  it('--page Letter --pseudonym-key: one Letter page under a stable keyed pseudonym, without the id', () => {
    const pseudonym = `PS-${createHmac('sha256', 'board key').update('DEMO-0001').digest('hex').slice(0, 12).toUpperCase()}`;
    for (const name of ['letter-1', 'letter-2']) {
      const out = join(dir, name);
      const r = falciform('report', MANIFEST, '--out', out, '--page', 'Letter', '--pseudonymise', '--pseudonym-key', 'board key');
      expect(r.status).toBe(0);
      expect(r.stdout).toContain('keyed pseudonym');
      const info = pdfInfo(join(out, 'board-summary.pdf'));
      expect(info.pages).toBe(1);
      expect(info.widthPt).toBeCloseTo(612, -0.5);
      expect(info.heightPt).toBeCloseTo(792, -0.5);
      const text = spawnSync('pdftotext', [join(out, 'board-summary.pdf'), '-'], { encoding: 'utf8' }).stdout;
      const html = readFileSync(join(out, 'board-summary.html'), 'utf8');
      const csv = readFileSync(join(out, 'case-form.csv'), 'utf8');
      for (const s of [text, html, csv]) {
        expect(s).toContain(pseudonym);
        expect(s).not.toContain('DEMO-0001');
        expect(s).not.toContain('1958');
      }
      expect(words(text)).toContain(CAUTION);
    }
  });

  it('--no-pdf writes no PDF; a random pseudonym differs between runs', () => {
    const ids = ['r1', 'r2'].map((name) => {
      const out = join(dir, name);
      const r = falciform('report', MANIFEST, '--out', out, '--pseudonymise', '--no-pdf');
      expect(r.status).toBe(0);
      expect(existsSync(join(out, 'board-summary.pdf'))).toBe(false);
      expect(r.stdout).toContain('random pseudonym');
      return /<h1[^>]*>(PS-[0-9A-F]{12})/.exec(readFileSync(join(out, 'board-summary.html'), 'utf8'))?.[1];
    });
    expect(ids[0]).toMatch(/^PS-/);
    expect(ids[0]).not.toBe(ids[1]);
  });

  it('FALCIFORM_BROWSER=none writes no PDF and says it was skipped at the user\'s request', () => {
    const out = join(dir, 'no-browser');
    const r = spawnSync(process.execPath, ['bin/falciform.js', 'report', MANIFEST, '--out', out], { encoding: 'utf8', env: { ...process.env, FALCIFORM_BROWSER: 'none' } });
    expect(r.status).toBe(0);
    expect(existsSync(join(out, 'board-summary.pdf'))).toBe(false);
    expect(r.stdout).toContain('board-summary.pdf not made: skipped at the user\'s request (FALCIFORM_BROWSER=none)');
  });

  it('a missing scan is bad input: exit 3, one line naming the file', () => {
    const copy = join(dir, 'broken');
    cpSync('demo-data/DEMO-0001', copy, { recursive: true });
    rmSync(join(copy, 'v3', 'scan.nii.gz'));
    const r = falciform('report', join(copy, 'manifest.json'), '--out', join(dir, 'broken-out'));
    expect(r.status).toBe(3);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(join(copy, 'v3', 'scan.nii.gz'));
  });

  it('usage errors exit 2', () => {
    expect(falciform('report', MANIFEST, '--out', join(dir, 'x'), '--page', 'A5').status).toBe(2);
    expect(falciform('report', MANIFEST).status).toBe(2);
    expect(falciform('report', MANIFEST, '--out', join(dir, 'x'), '--resection', 'whole-liver').status).toBe(2);
  });
});
