import { readFileSync } from 'node:fs';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { CASE_FORM_COLUMNS, caseFormCsv, caseFormRows, decimal, fractionsText } from '../../src/report/case-form.js';
import { csvField, toCsv } from '../../src/report/csv.js';
import { CAUTION } from '../../src/caution.js';
import { trackId } from '../../src/followup/ids.js';
import { syntheticPatient } from './fixtures.js';

// The case-form CSV read back with csv-parse, a general RFC 4180 parser (RFC 4180: Shafranovich,
// Common Format and MIME Type for Comma-Separated Values (CSV) Files, 2005), gives back exactly the
// rows it was written from.
const readBack = (text: string) => parse(text, { columns: true, bom: false, relax_column_count: false }) as Record<string, string>[];

describe('RFC 4180 writer', () => {
  it('quotes what must be quoted and doubles quotes (RFC 4180 §2, rules 5–7)', () => {
    expect(csvField('plain')).toBe('plain');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\r\nlines')).toBe('"two\r\nlines"');
    expect(csvField('lf\nonly')).toBe('"lf\nonly"');
    expect(csvField(' padded')).toBe('" padded"');
    expect(csvField('')).toBe('');
  });

  it('ends every record, the last too, in CRLF (RFC 4180 §2, rules 1–2)', () => {
    const text = toCsv(['a', 'b'], [{ a: '1', b: '2' }, { a: '3', b: '4' }]);
    expect(text).toBe('a,b\r\n1,2\r\n3,4\r\n');
  });

  it('hard values survive a round trip through csv-parse', () => {
    const columns = ['id', 'text', 'unicode'] as const;
    const rows = [
      { id: '1', text: 'comma, inside', unicode: 'Ségment IVb — µ 中 🙂' },
      { id: '2', text: '"quoted" and ""double""', unicode: '' },
      { id: '3', text: 'line\r\nbreak\nand\rCR', unicode: ' leading and trailing ' },
      { id: '4', text: '', unicode: '=1+1' },
    ];
    const text = toCsv(columns, rows);
    expect(readBack(text)).toEqual(rows);
    // UTF-8 without a byte-order mark.
    const bytes = new TextEncoder().encode(text);
    expect([...bytes.subarray(0, 3)]).not.toEqual([0xef, 0xbb, 0xbf]);
    expect(new TextDecoder('utf-8', { fatal: true }).decode(bytes)).toBe(text);
  });
});

describe('case-form export', () => {
  const input = syntheticPatient({ visits: 4, lesions: 7 });
  const rows = caseFormRows(input, 'SYN-0001');
  const text = caseFormCsv(rows);

  it('csv-parse reads back exactly the rows, columns in the documented order', () => {
    const back = readBack(text);
    expect(back).toEqual(rows);
    expect(Object.keys(back[0])).toEqual([...CASE_FORM_COLUMNS]);
    expect(text.split('\r\n')[0]).toBe(CASE_FORM_COLUMNS.join(','));
  });

  it('has one row per lesion per visit, and one per absent track', () => {
    const lesions = input.visits.reduce((n, v) => n + v.analysis.lesions.length, 0);
    const absent = input.followup.tracks.reduce((n, t) => n + Object.values(t.status).filter((s) => s !== 'present').length, 0);
    const lesionRows = rows.filter((r) => r.row_type === 'lesion');
    expect(lesionRows.filter((r) => r.status === 'present')).toHaveLength(lesions);
    expect(lesionRows.filter((r) => r.status !== 'present')).toHaveLength(absent);
    expect(absent).toBeGreaterThan(0);
  });

  it('names tracks by letters, with the target flag in a column of its own', () => {
    const lesionRows = rows.filter((r) => r.row_type === 'lesion');
    const ids = [...new Set(lesionRows.map((r) => r.track))];
    expect(ids).toEqual(input.followup.tracks.map((t, n) => trackId(n)));
    expect(ids.every((id) => /^[A-Z]+$/.test(id))).toBe(true);
    for (const r of lesionRows) expect(r.target).toBe(input.followup.tracks.find((t) => t.id === r.track)!.target ? 'yes' : 'no');
  });

  it('carries the analysis values, rounded as analyze --json rounds them', () => {
    for (const v of input.visits) {
      const f = input.followup.visits.find((x) => x.id === v.id)!;
      for (const l of v.analysis.lesions) {
        const r = rows.find((x) => x.visit === v.id && x.lesion === l.id)!;
        const track = input.followup.tracks.find((t) => t.lesions[v.id] === l.id)!;
        expect(r).toMatchObject({
          patient: 'SYN-0001', date: v.date, track: track.id, segment: l.segment ?? 'outside',
          longest_axial_mm: decimal(l.longestAxialMm, 2), short_axis_mm: decimal(l.shortAxisMm, 2),
          volume_ml: decimal(l.volumeMl, 3), margin_mm: decimal(l.marginMm, 2), nearest_other_segment: l.nearestOtherSegment ?? '',
          margin_alert: l.marginMm !== null && l.marginMm < 10 ? 'yes' : 'no', target: track.target ? 'yes' : 'no',
          response: v.id === 'v1' ? '' : f.overall, criteria: 'RECIST 1.1', caution: CAUTION,
        });
      }
    }
  });

  it('writes fractions in anatomical order, unconfirmed gone tracks as NE, and new lesions once', () => {
    expect(fractionsText({ VIII: 0.4, V: 0.6 })).toBe('V:0.6;VIII:0.4');
    expect(fractionsText({ IVb: 0.33333, II: 0.66667 })).toBe('II:0.6667;IVb:0.3333');
    // A track missing from a mask is NE until a reader confirms it gone (RECIST 1.1 section 4.4.2,
    // missing assessments, from memory); the fixture has no reader's calls.
    const gone = rows.filter((r) => r.status === 'gone');
    expect(gone.length).toBeGreaterThan(0);
    expect(gone.every((r) => r.lesion === '' && r.longest_axial_mm === 'NE' && r.evaluation === 'NE')).toBe(true);
    const fresh = rows.filter((r) => r.row_type === 'lesion' && r.new_lesion === 'yes');
    expect(fresh.map((r) => r.visit)).toEqual(['v3']);
    expect(rows.filter((r) => r.visit === 'v1').every((r) => r.days_from_baseline === '0' && r.change_from_baseline_pct === '')).toBe(true);
  });

  it('starts each visit with one summary row: the visit\'s response, sums and reading, lesion columns empty', () => {
    const summaries = rows.filter((r) => r.row_type === 'visit');
    expect(summaries.map((r) => r.visit)).toEqual(input.followup.visits.map((v) => v.id));
    for (const v of input.followup.visits) {
      const own = rows.filter((r) => r.visit === v.id);
      expect(own[0].row_type).toBe('visit');
      expect(own.slice(1).every((r) => r.row_type === 'lesion')).toBe(true);
      expect(own[0]).toMatchObject({
        track: '', lesion: '', segment: '', longest_axial_mm: '', target: '',
        target_sum_mm: decimal(v.response.targetSumMm, 2),
        margin_alert: v.marginAlerts.length ? 'yes' : 'no',
        evaluation: v.response.targetSumComplete ? 'measured' : 'NE',
      });
    }
    // The response is computed, and says so on every row that carries one.
    expect(rows.every((r) => (r.response === '') === (r.response_basis === ''))).toBe(true);
    expect(rows.filter((r) => r.response !== '').every((r) => r.response_basis === 'computed')).toBe(true);
  });

  it('writes NE for a track that cannot be assessed or is missing unconfirmed, and absent for one confirmed gone (RECIST 1.1: 0 mm)', () => {
    const absent = rows.filter((r) => r.row_type === 'lesion' && r.status !== 'present');
    expect(absent.length).toBeGreaterThan(0);
    for (const r of absent) expect(r.evaluation).toBe(r.longest_axial_mm === 'NE' ? 'NE' : 'absent');
    for (const r of absent) expect(r.longest_axial_mm).toBe(r.status === 'not-evaluable' || r.status === 'gone' ? 'NE' : '0');
    expect(rows.filter((r) => r.status === 'present').every((r) => r.evaluation === 'measured')).toBe(true);
  });

  it('fills the reading columns from the manifest, the reader name from the app when the manifest has none', () => {
    const [first, ...rest] = input.manifest.visits;
    const withReading = {
      ...input,
      manifest: { ...input.manifest, visits: [{ ...first, modality: 'CT' as const, contrastPhase: 'portal venous', reader: 'A. Reader', readDate: '2026-02-01' }, ...rest] },
      visits: input.visits.map((v) => ({ ...v, sliceThicknessMm: 2.5 })),
    };
    const out = caseFormRows(withReading, 'SYN-0001', { reader: 'B. Nurse' });
    const at = (visit: string) => out.filter((r) => r.visit === visit);
    for (const r of at(first.id)) {
      expect(r).toMatchObject({ modality: 'CT', contrast_phase: 'portal venous', slice_thickness_mm: '2.5', reader: 'A. Reader', reading_date: '2026-02-01' });
    }
    for (const r of at(rest[0].id)) expect(r).toMatchObject({ modality: '', contrast_phase: '', reader: 'B. Nurse', reading_date: '' });
    expect(rows.every((r) => r.reader === '' && r.slice_thickness_mm === '')).toBe(true);
  });

  it('decimal gives the shortest form of the rounded value and empty for missing', () => {
    expect(decimal(24.6749, 2)).toBe('24.67');
    expect(decimal(14, 2)).toBe('14');
    expect(decimal(-0.001, 2)).toBe('0');
    expect(decimal(null, 2)).toBe('');
    expect(decimal(Number.NaN, 2)).toBe('');
  });
});

describe('docs/case-form.md', () => {
  // The data dictionary is the form's contract: its column table lists every column, in order.
  const doc = readFileSync('docs/case-form.md', 'utf8');
  const documented = [...doc.matchAll(/^\| `([a-z_]+)` \|/gm)].map((m) => m[1]);

  it('lists exactly the columns the export writes, in the same order', () => {
    expect(documented).toEqual([...CASE_FORM_COLUMNS]);
  });

  it('names every value the new columns take', () => {
    const row = (name: string) => doc.split('\n').find((l) => l.startsWith(`| \`${name}\` |`)) ?? '';
    for (const v of ['`visit`', '`lesion`']) expect(row('row_type')).toContain(v);
    for (const v of ['`measured`', '`absent`', '`NE`']) expect(row('evaluation')).toContain(v);
    for (const v of ['`A`', '`Z`', '`AA`', '`target`']) expect(row('track')).toContain(v);
    expect(row('response_basis')).toContain('`computed`');
    for (const v of ['`CT`', '`MR`']) expect(row('modality')).toContain(v);
    const input = syntheticPatient({ visits: 3, lesions: 4 });
    const values = new Set(caseFormRows(input, 'SYN-0001').flatMap((r) => [r.row_type, r.evaluation, r.response_basis]).filter(Boolean));
    for (const v of values) expect(`${row('row_type')}${row('evaluation')}${row('response_basis')}`).toContain(`\`${v}\``);
  });
});
