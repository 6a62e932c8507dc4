import { describe, expect, it } from 'vitest';
import { boardSheetHtml } from '../../src/report/board-html.js';
import { buildBoardSummary, madeAtText, MAX_TABLE_VISITS, MAX_TRACK_ROWS, MAX_VISIT_ROWS } from '../../src/report/board-summary.js';
import { placeLesions } from '../../src/report/diagram-placement.js';
import { segmentDiagramSvg } from '../../src/report/segment-diagram-svg.js';
import { sizeChartSvg } from '../../src/report/size-chart-svg.js';
import { OKABE_ITO, SEGMENT_COLOURS } from '../../src/report/palette.js';
import { syntheticPatient } from './fixtures.js';

const madeAt = new Date(Date.UTC(2026, 5, 30, 8, 5));

describe('viable diameters on the board summary', () => {
  it('under mRECIST each present lesion shows its viable diameter beside its longest, labelled viable', () => {
    // mRECIST (Lencioni and Llovet 2010, from memory) sums viable diameters: the page shows them.
    const input = syntheticPatient({ visits: 3, lesions: 3, viable: true });
    const s = buildBoardSummary(input, { madeAt });
    expect(s.criteria).toBe('mRECIST');
    expect(s.lesionTable.viable).toBe(true);
    const t1 = input.followup.tracks[0];
    const cell = s.lesionTable.rows.find((r) => r.id === t1.id)!.cells[0]!;
    expect(cell.longestAxialMm).toBe(12);
    expect(cell.viableAxialMm).toBe(6);
    const html = boardSheetHtml(s);
    expect(html).toContain('12.0 <span class="b-muted">viable 6.0</span>');
    expect(html).toMatch(/then the viable \(enhancing\) diameter/);
    expect(html).toMatch(/sums of target viable \(enhancing\) diameters/);
  });

  it('under RECIST 1.1 without viable measures nothing about viable tumour is shown', () => {
    const s = buildBoardSummary(syntheticPatient({ visits: 3, lesions: 3 }), { madeAt });
    expect(s.lesionTable.viable).toBe(false);
    expect(s.lesionTable.rows.every((r) => r.cells.every((c) => c === null || !('viableAxialMm' in c)))).toBe(true);
    expect(boardSheetHtml(s)).not.toMatch(/viable/i);
  });
});

describe('board summary model', () => {
  it('carries the latest response, the targets and when it was made', () => {
    const input = syntheticPatient({ visits: 4, lesions: 5 });
    const s = buildBoardSummary(input, { madeAt });
    const f = input.followup;
    expect(s.latest.id).toBe('v4');
    expect(s.latest.response).toBe(f.visits[3].overall);
    expect(s.visits.map((v) => v.response)).toEqual(['baseline', ...f.visits.slice(1).map((v) => v.overall)]);
    expect(s.targets).toEqual(f.targets);
    expect(s.madeAt).toBe(madeAtText(madeAt));
    // Local time with its offset from UTC, written as ISO 8601 writes a zone designator.
    expect(madeAtText(madeAt, 0)).toBe('2026-06-30 08:05 +00:00');
    expect(madeAtText(madeAt, 120)).toBe('2026-06-30 10:05 +02:00');
    expect(madeAtText(madeAt, -570)).toBe('2026-06-29 22:35 -09:30');
    expect(s.patient.facts.map((x) => x.label)).toEqual(['Born', 'Sex', 'Height', 'Weight']);
    expect(s.lesionTable.rows.filter((r) => r.target).map((r) => r.id)).toEqual(f.targets.tracks.slice().sort());
  });

  it('keeps the baseline and the latest visits, and names what it leaves out', () => {
    const s = buildBoardSummary(syntheticPatient({ visits: 11, lesions: 16 }), { madeAt });
    const all = Array.from({ length: 11 }, (_, k) => `v${k + 1}`);
    const latest = all.slice(all.length - (MAX_VISIT_ROWS - 1));
    expect(s.visits.map((v) => v.id)).toEqual(['v1', ...latest]);
    expect(s.visitsLeftOut).toEqual(all.slice(1, all.length - (MAX_VISIT_ROWS - 1)));
    expect(s.lesionTable.visits).toHaveLength(MAX_TABLE_VISITS);
    expect(s.lesionTable.rows).toHaveLength(MAX_TRACK_ROWS);
    expect(s.lesionTable.rows.length + s.lesionTable.tracksLeftOut.length).toBe(16);
    // Targets come first.
    expect(s.lesionTable.rows.slice(0, 2).every((r) => r.target)).toBe(true);
  });

  it('lists margin alerts with their distance, the latest visit first', () => {
    const s = buildBoardSummary(syntheticPatient({ visits: 3, lesions: 7 }), { madeAt });
    expect(s.alerts.length).toBeGreaterThan(0);
    expect(s.alerts[0].latest).toBe(true);
    expect(s.alerts[0].visit).toBe('v3');
    for (const a of s.alerts) expect([0, 4.5]).toContain(a.marginMm);
  });
});

describe('size chart', () => {
  it('places visits by their real dates (time to scale)', () => {
    const input = syntheticPatient({ visits: 4, lesions: 2 });
    // Uneven intervals: 10, 40 and 100 days after baseline.
    const dates = ['2026-01-01', '2026-01-11', '2026-02-10', '2026-04-11'];
    input.followup.visits.forEach((v, k) => (v.date = dates[k]));
    const svg = sizeChartSvg(buildBoardSummary(input, { madeAt }).chart);
    const line = /<polyline points="([^"]+)"/.exec(svg)![1];
    const xs = line.split(' ').map((p) => Number(p.split(',')[0]));
    const gap = (k: number) => xs[k] - xs[0];
    expect(gap(2) / gap(1)).toBeCloseTo(40 / 10, 1);
    expect(gap(3) / gap(1)).toBeCloseTo(100 / 10, 1);
    // Axes say what they measure, in which unit.
    expect(svg).toContain('Longest axial diameter (mm)');
    expect(svg).toContain('Visit date (YYYY-MM-DD)');
    // A date label too close to the one before is left out; the first and last always show.
    expect(svg).toContain(`>${dates[0]}<`);
    expect(svg).toContain(`>${dates[3]}<`);
  });

  it('colours each track by its segment from the Okabe-Ito palette', () => {
    const s = buildBoardSummary(syntheticPatient({ visits: 2, lesions: 3 }), { madeAt });
    const svg = sizeChartSvg(s.chart);
    for (const series of s.chart.series) expect(svg).toContain(`stroke="${SEGMENT_COLOURS[series.segment!]}"`);
    expect(Object.values(SEGMENT_COLOURS).every((c) => (Object.values(OKABE_ITO) as string[]).includes(c))).toBe(true);
  });
});

describe('segment diagram', () => {
  it('draws one dot and name per lesion of the latest visit, placed as the app places them, and IV split when the map splits it', () => {
    const input = syntheticPatient({ visits: 3, lesions: 6 });
    const s = buildBoardSummary(input, { madeAt });
    const svg = segmentDiagramSvg(s.diagram);
    const names = [...svg.matchAll(/class="diagram-lesion-name"[^>]*>([^<]+)</g)].map((m) => m[1]);
    expect(names.sort()).toEqual(s.diagram.lesions.map((l) => (l.track ?? l.lesion) + (l.isNew ? ' new' : '')).sort());
    expect(s.diagram.lesions).toEqual(placeLesions(input.followup, input.visits.map((v) => ({ id: v.id, lesions: v.analysis.lesions })), 'v3'));
    for (const seg of ['I', 'II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII']) expect(svg).toContain(`>${seg}</text>`);
    expect(svg).not.toContain('>IV</text>');
    const unsplit = segmentDiagramSvg({ ...s.diagram, segments: ['I', 'II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII'] });
    expect(unsplit).toContain('>IV</text>');
    expect(unsplit).not.toContain('>IVa</text>');
    // Presentation attributes only: the app injects the page under a CSP without inline styles.
    expect(svg).not.toMatch(/style=/);
    // Each lesion's ring (margin alert) and fill (target) as the follow-up has them.
    for (const l of s.diagram.lesions) {
      const g = new RegExp(`<g data-lesion="${l.lesion}"[^>]*data-alert="${l.alert}" data-target="${l.target}">`);
      expect(svg).toMatch(g);
    }
    expect(s.diagram.lesions.some((l) => l.alert)).toBe(true);
    expect(s.diagram.lesions.some((l) => l.target)).toBe(true);
  });
});
