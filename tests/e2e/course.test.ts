import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import type { FollowupResult } from '../../src/followup/followup.js';
import { compareTrackIds } from '../../src/followup/ids.js';
import { launchChromium, watchErrors } from './browser.js';

// The course tabs on the demo patients in Chromium: the charts plot exactly what `falciform followup`
// prints for the same patient (the app and the command line share one core), a margin alert opens
// its lesion in the visit view, and a track edit changes the tracks and the edit trail.
const RENDERER = process.env.FALCIFORM_TEST_RENDERER ?? 'build/renderer';

/** The command line's follow-up of a demo patient, from the same files the app imported. */
function cliFollowup(id: string): FollowupResult {
  const out = execFileSync(process.execPath, ['bin/falciform.js', 'followup', join('demo-data', id, 'manifest.json'), '--json'], { encoding: 'utf8' });
  return JSON.parse(out) as FollowupResult;
}

/** The treatment events a demo patient's manifest brings with it. */
function demoTreatments(id: string): { date: string; label: string }[] {
  return (JSON.parse(readFileSync(join('demo-data', id, 'manifest.json'), 'utf8')) as { treatments?: { date: string; label: string }[] }).treatments ?? [];
}

/** Points lie on a straight map from value to pixel (within half a pixel): where the chart drew them. */
function expectLinear(pairs: [number, number][], what: string) {
  const distinct = pairs.filter((p, n) => pairs.findIndex((q) => q[0] === p[0]) === n);
  const [a, b] = [distinct[0], distinct.find((p) => p[0] !== distinct[0][0])];
  if (!a || !b) return;
  const slope = (b[1] - a[1]) / (b[0] - a[0]);
  for (const [v, px] of pairs) expect(Math.abs(a[1] + slope * (v - a[0]) - px), `${what}: value ${v} at ${px}`).toBeLessThan(0.5);
}

describe('course of disease, alerts, diagram and track edits in the browser', () => {
  let server: WebServer;
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  let errors: string[];

  beforeAll(async () => {
    if (!existsSync(join(RENDERER, 'index.html'))) throw new Error('build the renderer first: npx vite build');
    if (!existsSync('build/src/cli/main.js')) throw new Error('build the command line first: npx tsc -p tsconfig.node.json');
    mkdirSync('test-results', { recursive: true });
    server = await startWebServer(RENDERER);
    browser = await launchChromium();
    context = await browser.newContext({ viewport: { width: 1360, height: 900 } });
    page = await context.newPage();
    errors = watchErrors(page);
    // First start: the demo patients are imported into this fresh profile's store.
    await page.goto(server.url);
    await page.locator('[data-patient="DEMO-0003"]').waitFor({ timeout: 90_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  /** Opens a patient's tab and waits until its analysis is on screen and finished. */
  async function openTab(patientId: string, tab: string, ready: string) {
    await page.evaluate((h) => { window.location.hash = h; }, `#/patient/${patientId}?tab=${tab}`);
    await page.getByTestId(ready).first().waitFor({ timeout: 90_000 });
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 90_000 });
  }

  const points = (chart: string, attrs: string[]) =>
    page.locator(`[data-chart="${chart}"]`).evaluateAll((els, names) => els.map((e) => {
      const out: Record<string, string | number> = { cx: Number(e.getAttribute('data-cx') ?? e.getAttribute('cx')), cy: Number(e.getAttribute('data-cy') ?? e.getAttribute('cy')) };
      for (const n of names) out[n] = e.getAttribute(`data-${n}`) ?? '';
      return out;
    }), attrs);

  it('DEMO-0001: every chart point is the follow-up number the command line prints', async () => {
    const fu = cliFollowup('DEMO-0001');
    await openTab('DEMO-0001', 'course', 'chart-response');
    const date = new Map(fu.visits.map((v) => [v.id, Date.parse(`${v.date}T00:00:00Z`)]));

    const response = await points('response', ['visit', 'sum', 'category']);
    expect(response.map((p) => [p.visit, Number(p.sum), p.category])).toEqual(
      fu.visits.map((v) => [v.id, v.response.targetSumMm, v.response.category ?? 'baseline']),
    );
    expectLinear(response.map((p) => [Number(p.sum), p.cy as number]), 'response y');
    expectLinear(response.map((p) => [date.get(p.visit as string)!, p.cx as number]), 'response x (date)');
    // The values table under the chart says the same.
    const table = await page.getByTestId('response-value').evaluateAll((rows) => rows.map((r) => [r.getAttribute('data-visit'), Number(r.getAttribute('data-sum')), r.getAttribute('data-category')]));
    expect(table).toEqual(response.map((p) => [p.visit, Number(p.sum), p.category]));

    const lesions = await points('lesion', ['track', 'visit', 'mm', 'segment']);
    const expected = fu.tracks.flatMap((t) => Object.entries(t.longestAxialMm).map(([visit, mm]) => `${t.id} ${visit} ${mm}`));
    expect(lesions.map((p) => `${p.track} ${p.visit} ${Number(p.mm)}`).sort()).toEqual(expected.sort());
    expectLinear(lesions.map((p) => [Number(p.mm), p.cy as number]), 'lesion y');
    for (const p of lesions) {
      const t = fu.tracks.find((x) => x.id === p.track)!;
      if (t.segments[p.visit as string]) expect(p.segment).toBe(t.segments[p.visit as string]);
    }

    const sums = await points('burden-mm', ['segment', 'visit', 'mm']);
    expect(sums.map((p) => `${p.segment} ${p.visit} ${Number(p.mm)}`).sort()).toEqual(
      fu.burden.map((b) => `${b.segment ?? 'outside'} ${b.visit} ${b.sumLongestAxialMm}`).sort(),
    );
    expectLinear(sums.map((p) => [Number(p.mm), p.cy as number]), 'burden y');
    const volumes = await points('burden-ml', ['segment', 'visit', 'ml']);
    expect(volumes.map((p) => `${p.segment} ${p.visit} ${Number(p.ml)}`).sort()).toEqual(
      fu.burden.filter((b) => b.volumeMl !== null).map((b) => `${b.segment ?? 'outside'} ${b.visit} ${b.volumeMl}`).sort(),
    );

    // The stored treatment (the demo's chemotherapy start) is a line on each chart; units on every axis.
    const charts = await page.locator('.chart').count();
    expect(charts).toBe(4);
    expect(await page.locator('.treatment-line').count()).toBe(charts * demoTreatments('DEMO-0001').length);
    const axisText = await page.locator('.chart').allTextContents();
    for (const [n, unit] of [[0, '(mm)'], [1, '(mm)'], [2, '(mm)'], [3, '(mL)']] as const) {
      expect(axisText[n]).toContain(unit);
      expect(axisText[n]).toContain('Visit date');
    }
    expect(axisText[0]).toContain(fu.visits[0].date);
    await page.screenshot({ path: 'test-results/course-DEMO-0001.png', fullPage: true });
  });

  it('DEMO-0001: each lesion line is labelled with its track id at its last point, the labels nudged apart', async () => {
    const fu = cliFollowup('DEMO-0001');
    await openTab('DEMO-0001', 'course', 'chart-response');
    const lesions = await points('lesion', ['track', 'visit']);
    const labels = await page.getByTestId('line-end-label').evaluateAll((els) => els.map((g) => {
      const text = g.querySelector('text')!;
      const box = (text as SVGTextElement).getBBox();
      return {
        track: g.getAttribute('data-track')!, text: text.textContent, pointY: Number(g.getAttribute('data-point-y')),
        x: box.x, y: box.y, width: box.width, height: box.height, leader: g.querySelector('line') !== null,
      };
    }));
    expect(labels.map((l) => l.track).sort()).toEqual(fu.tracks.map((t) => t.id).sort());
    const lastVisit = (track: string) => Object.keys(fu.tracks.find((t) => t.id === track)!.longestAxialMm).pop()!;
    for (const l of labels) {
      expect(l.text).toBe(l.track);
      // At the line's last point: right of it, and at its height unless nudged (then with a leader).
      const end = lesions.find((p) => p.track === l.track && p.visit === lastVisit(l.track))!;
      expect(Math.abs(l.pointY - (end.cy as number))).toBeLessThan(0.5);
      expect(l.x).toBeGreaterThan(end.cx as number);
      const centre = l.y + l.height / 2;
      if (!l.leader) expect(Math.abs(centre - l.pointY)).toBeLessThan(2);
    }
    // No two labels overlap (their text boxes, as the browser laid them out).
    for (const a of labels) {
      for (const b of labels) {
        if (a === b) continue;
        const apart = a.x + a.width <= b.x || b.x + b.width <= a.x || a.y + a.height <= b.y || b.y + b.height <= a.y;
        expect(apart, `${a.track} and ${b.track}`).toBe(true);
      }
    }
    // DEMO-0001's A and B end 2 mm apart (12 and 14 mm at v4), closer than a label's height: nudged.
    expect(labels.filter((l) => l.leader).map((l) => l.track).sort()).toEqual(['A', 'B']);
    await page.getByTestId('chart-lesions').screenshot({ path: 'test-results/course-lesion-labels.png' });
  });

  it('DEMO-0001: a treatment event added on the course tab appears on every chart, and goes when deleted', async () => {
    await page.getByTestId('treatment-date').fill('2026-05-18');
    await page.getByTestId('treatment-kind').selectOption('resection');
    await page.getByTestId('treatment-label').fill('Resection, segment II');
    await page.getByTestId('treatment-add').click();
    const stored = demoTreatments('DEMO-0001');
    await expect.poll(() => page.locator('.treatment-line').count()).toBe(4 * (stored.length + 1));
    const rows = await page.getByTestId('treatment-row').allTextContents();
    expect(rows).toHaveLength(stored.length + 1);
    expect(rows.find((r) => r.includes('Resection, segment II'))).toMatch(/^2026-05-18resection/);
    await page.getByRole('button', { name: 'Delete Resection, segment II (2026-05-18)' }).click();
    await expect.poll(() => page.locator('.treatment-line').count()).toBe(4 * stored.length);
  });

  it('DEMO-0002: the response chart follows the primary criteria (mRECIST) and shows RECIST 1.1 on request', async () => {
    const fu = cliFollowup('DEMO-0002');
    expect(fu.criteria).toBe('mRECIST');
    await openTab('DEMO-0002', 'course', 'chart-response');
    const sums = () => page.locator('[data-chart="response"]').evaluateAll((els) => els.map((e) => [e.getAttribute('data-visit'), Number(e.getAttribute('data-sum')), e.getAttribute('data-category')]));
    expect(await sums()).toEqual(fu.visits.map((v) => [v.id, v.response.targetSumMm, v.response.category ?? 'baseline']));
    expect(await page.getByTestId('chart-response').locator('h4').textContent()).toContain('mRECIST');
    await page.screenshot({ path: 'test-results/course-DEMO-0002.png', fullPage: true });
    await page.getByRole('radio', { name: 'RECIST 1.1' }).check({ force: true });
    const recist = fu.visits.map((v) => v.otherResponses.find((r) => r.criteria === 'RECIST 1.1')!);
    await expect.poll(sums).toEqual(fu.visits.map((v, k) => [v.id, recist[k].targetSumMm, recist[k].category ?? 'baseline']));
  });

  it('DEMO-0001: the segment diagram shows the chosen visit\'s lesions, sized by diameter', async () => {
    await openTab('DEMO-0001', 'diagram', 'segment-diagram');
    const lastVisit = (await page.getByTestId('diagram-visits').locator('input').evaluateAll((els) => els.map((e) => (e as HTMLInputElement).value))).at(-1);
    const fu = cliFollowup('DEMO-0001');
    const dots = () => page.getByTestId('diagram-lesion').evaluateAll((els) => els.map((e) => [e.getAttribute('data-track'), e.getAttribute('data-segment')]));
    const at = (visit: string) => fu.tracks.filter((t) => t.lesions[visit]).map((t) => [t.id, t.segments[visit]]);
    expect((await dots()).sort()).toEqual(at(lastVisit!).sort());
    await page.getByTestId('diagram-visit-v1').check({ force: true });
    await expect.poll(async () => (await dots()).sort()).toEqual(at('v1').sort());
    // Dot radius follows the lesion's diameter: 1 px per mm in the drawing's own units.
    const sizes = await page.getByTestId('diagram-lesion').evaluateAll((els) => els.map((e) => [Number(e.getAttribute('data-mm')), Number(e.querySelector('.lesion-dot')!.getAttribute('r'))]));
    for (const [mm, r] of sizes) expect(r).toBeCloseTo(Math.min(30, Math.max(3, mm / 2)), 6);
    await page.screenshot({ path: 'test-results/diagram-DEMO-0001.png', fullPage: true });
  });

  it('DEMO-0003: margin alerts match the follow-up, and a click opens that lesion in the visit view', async () => {
    const fu = cliFollowup('DEMO-0003');
    await openTab('DEMO-0003', 'alerts', 'alert-table');
    const rows = await page.getByTestId('alert-row').evaluateAll((els) => els.map((e) => [e.getAttribute('data-visit'), e.getAttribute('data-lesion')]));
    const flagged = fu.visits.flatMap((v) => v.marginAlerts.map((track) => [v.id, fu.tracks.find((t) => t.id === track)!.lesions[v.id]]));
    expect(rows.sort()).toEqual(flagged.sort());
    expect(rows.length).toBeGreaterThan(0);
    await page.screenshot({ path: 'test-results/alerts-DEMO-0003.png', fullPage: true });

    // The diagram of the latest visit rings the same lesions (IV split into IVa and IVb in this map).
    const latest = fu.visits[fu.visits.length - 1];
    await openTab('DEMO-0003', 'diagram', 'segment-diagram');
    const ringed = await page.locator('[data-testid="diagram-lesion"][data-alert="true"]').evaluateAll((els) => els.map((e) => e.getAttribute('data-lesion')));
    expect(ringed.sort()).toEqual(flagged.filter(([v]) => v === latest.id).map(([, l]) => l).sort());
    expect(await page.locator('[data-segment-region="IVb"]').count()).toBe(1);
    await page.screenshot({ path: 'test-results/diagram-DEMO-0003.png', fullPage: true });
    await openTab('DEMO-0003', 'alerts', 'alert-table');

    const first = page.getByTestId('alert-row').first();
    const [visit, lesion] = [await first.getAttribute('data-visit'), await first.getAttribute('data-lesion')];
    await first.getByTestId('alert-open').click();
    await page.getByTestId('visit-view').waitFor();
    expect(new URL(page.url()).hash).toBe(`#/patient/DEMO-0003/visit/${visit}?lesion=${lesion}`);
    const row = page.locator(`[data-testid="lesion-row"][data-lesion="${lesion}"]`);
    await row.waitFor({ timeout: 90_000 });
    await expect.poll(() => row.getAttribute('class')).toMatch(/\bselected\b/);
    expect(await page.locator('[data-testid="lesion-row"].selected').count()).toBe(1);
    // For the screenshot only: let the images load where the viewer can.
    await page.getByTestId('slice-viewer').waitFor({ timeout: 30_000 }).catch(() => undefined);
    await page.screenshot({ path: 'test-results/alert-opens-lesion.png', fullPage: true });
  });

  it('DEMO-0001: unlink and link again change the track table, the charts and the trail', async () => {
    await openTab('DEMO-0001', 'tracks', 'track-table');
    const cell = (track: string, visit: string) => page.locator(`[data-testid="track-row"][data-track="${track}"] td[data-visit="${visit}"]`);
    const trackIds = () => page.getByTestId('track-row').evaluateAll((els) => els.map((e) => e.getAttribute('data-track')));
    const trail = () => page.getByTestId('trail-row').allTextContents();
    const before = await trackIds();
    const lesion = cliFollowup('DEMO-0001').tracks.find((t) => t.id === 'A')!.lesions.v2;
    expect(await cell('A', 'v2').getAttribute('data-lesion')).toBe(lesion);
    const chip = page.locator(`[data-testid="lesion-chip"][data-visit="v2"][data-lesion="${lesion}"]`);
    // The treatment event added and deleted on the course tab is in the trail, newest first, its values labelled.
    expect((await trail()).slice(0, 2)).toEqual([
      expect.stringMatching(/treatment removed.*date 2026-05-18; kind resection; label Resection, segment II/),
      expect.stringMatching(/treatment added.*date 2026-05-18; kind resection; label Resection, segment II/),
    ]);

    // Unlink A's lesion at v2 from A: it starts a track of its own, A is gone at v2.
    await chip.click();
    await page.getByTestId('unlink-lesion').click();
    await expect.poll(() => cell('A', 'v2').getAttribute('data-status'), { timeout: 90_000 }).toBe('gone');
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 90_000 });
    const after = await trackIds();
    expect(after).toHaveLength(before.length + 1);
    const fresh = after.find((t) => !before.includes(t))!;
    expect(await cell(fresh, 'v2').getAttribute('data-lesion')).toBe(lesion);
    expect((await trail())[0]).toMatch(new RegExp(`correction: unlink v2/${lesion}.*A.*not A`));
    expect(await page.getByTestId('override-row').count()).toBe(1);
    await page.screenshot({ path: 'test-results/tracks-unlinked.png', fullPage: true });

    // Link it back to A: the original tracks return, the link marked as the reader's.
    await chip.click();
    await page.getByTestId('link-track').selectOption('A');
    await page.getByTestId('link-lesion').click();
    await expect.poll(() => cell('A', 'v2').getAttribute('data-lesion'), { timeout: 90_000 }).toBe(lesion);
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 90_000 });
    expect(await trackIds()).toEqual(before);
    expect(await cell('A', 'v2').textContent()).toContain('linked by reader');
    const entries = await trail();
    expect(entries[0]).toMatch(new RegExp(`correction: link v2/${lesion}.*${fresh}.*A`));
    expect(entries[1]).toMatch(new RegExp(`correction removed: unlink v2/${lesion}`));
    await page.screenshot({ path: 'test-results/tracks-linked.png', fullPage: true });

    // The charts follow at once: the course tab's response is again PR at v2.
    await openTab('DEMO-0001', 'course', 'chart-response');
    const fu = cliFollowup('DEMO-0001');
    const categories = await page.locator('[data-chart="response"]').evaluateAll((els) => els.map((e) => e.getAttribute('data-category')));
    expect(categories).toEqual(fu.visits.map((v) => v.response.category ?? 'baseline'));
    expect(errors).toEqual([]);
  });
  it('DEMO-0003: choosing targets is stored, audited, capped at two, and can return to the automatic choice', async () => {
    const fu = cliFollowup('DEMO-0003');
    expect(fu.targets.tracks).toHaveLength(2);
    await openTab('DEMO-0003', 'tracks', 'track-table');
    const list = page.getByTestId('target-list');
    expect(await list.textContent()).toBe([...fu.targets.tracks].sort(compareTrackIds).join(', '));
    const [keep, drop] = fu.targets.tracks;
    await page.getByTestId(`target-${drop}`).uncheck();
    await expect.poll(() => list.textContent(), { timeout: 90_000 }).toBe(keep);
    await expect.poll(async () => (await page.getByTestId('trail-row').allTextContents())[0], { timeout: 90_000 }).toMatch(new RegExp(`targets changed.*automatic.*${keep}`));
    await expect.poll(() => page.getByText('chosen by a reader').count(), { timeout: 90_000 }).toBe(1);
    // Two ticked is the most: RECIST 1.1 takes at most two targets per organ (Eisenhauer et al. 2009).
    await page.getByTestId(`target-${drop}`).check();
    // Listed in track order (A before B), whatever order they were ticked in.
    await expect.poll(() => list.textContent(), { timeout: 90_000 }).toBe([keep, drop].sort(compareTrackIds).join(', '));
    const unticked = page.locator('[data-testid="track-table"] input[type="checkbox"]:not(:checked)');
    for (const box of await unticked.all()) expect(await box.isDisabled()).toBe(true);
    await page.getByTestId('targets-automatic').click();
    await expect.poll(() => page.getByTestId('targets-automatic').count(), { timeout: 90_000 }).toBe(0);
    expect(await list.textContent()).toBe([...fu.targets.tracks].sort(compareTrackIds).join(', '));
    expect(errors).toEqual([]);
  });
});
