import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { CAUTION } from '../../src/caution.js';
import { pdfInfo, pdfWords } from '../report/pdf.js';
import { launchChromium, watchErrors } from './browser.js';

// The Board summary tab on the demo patient DEMO-0001 in headless Chromium: the page as it will print
// holds the caution, the response and the lesions of `falciform followup --json` on the same demo
// manifest; printed (playwright's page.pdf, print media) it is one page of the chosen paper, read
// back with pdftotext and pdfinfo. The case form it exports is the one `falciform report` writes,
// row for row, and its segment map read back by nibabel equals the command line's.
// Paper sizes: ISO 216 A4 = 595 × 842 pt; US Letter = 612 × 792 pt.

interface Followup {
  visits: { id: string; date: string; overall: string | null }[];
  tracks: { id: string; target: boolean; lesions: Record<string, string>; segments: Record<string, string | null>; status: Record<string, string> }[];
}

const MANIFEST = 'demo-data/DEMO-0001/manifest.json';
const falciform = (...args: string[]) => spawnSync(process.execPath, ['bin/falciform.js', ...args], { encoding: 'utf8' });

describe('board summary in the browser', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;
  let errors: string[];
  let dir: string;
  let followup: Followup;

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
    mkdirSync('test-results', { recursive: true });
    dir = mkdtempSync(join(tmpdir(), 'falciform-board-'));
    const f = falciform('followup', MANIFEST, '--json');
    if (f.status !== 0) throw new Error(f.stderr);
    followup = JSON.parse(f.stdout) as Followup;
    const r = falciform('report', MANIFEST, '--out', join(dir, 'cli'), '--no-pdf');
    if (r.status !== 0) throw new Error(r.stderr);
    server = await startWebServer('build/renderer');
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: { width: 1440, height: 1000 }, acceptDownloads: true });
    page = await context.newPage();
    errors = watchErrors(page);
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  const sheet = () => page.getByTestId('board-preview').getByTestId('board-sheet');
  const words = (s: string | null) => (s ?? '').replace(/\s+/g, ' ').trim();

  it('shows the summary as it will print: caution, response and every lesion', async () => {
    await page.goto(server.url);
    // Demo patients are imported on first start.
    await page.locator('[data-patient="DEMO-0001"]').waitFor({ timeout: 90_000 });
    await page.goto(`${server.url}#/patient/DEMO-0001`);
    await page.getByTestId('tab-board').click();
    await sheet().waitFor({ timeout: 60_000 });
    const text = words(await sheet().textContent());
    expect(text).toContain(CAUTION);
    expect(text).toContain('DEMO-0001');
    const last = followup.visits[followup.visits.length - 1];
    expect(await page.getByTestId('board-preview').getByTestId('board-response').textContent()).toBe(last.overall);
    for (const t of followup.tracks) {
      const row = words(await sheet().locator(`tr[data-track="${t.id}"]`).textContent());
      for (const v of followup.visits) {
        if (t.status[v.id] === 'present') expect(row).toContain(t.lesions[v.id]);
      }
      expect(row).toContain(Object.values(t.segments).filter(Boolean).pop()!);
    }
    // Key images: each target at baseline and at the latest visit, drawn by the core in the analysis worker.
    const targets = followup.tracks.filter((t) => t.target).map((t) => t.id);
    const keys = sheet().getByTestId('board-key-images');
    expect(await keys.locator('[data-key-track]').evaluateAll((xs) => xs.map((x) => x.getAttribute('data-key-track')))).toEqual(targets);
    const imgs = keys.locator('img');
    expect(await imgs.count()).toBe(2 * targets.length);
    // Every image decoded, at the size the core draws.
    expect(await imgs.evaluateAll((xs) => xs.map((x) => (x as HTMLImageElement).naturalWidth))).toEqual(Array(2 * targets.length).fill(112));
    await page.screenshot({ path: 'test-results/board-tab.png', fullPage: true });
  });

  it('prints as one page of A4 or Letter that holds the lesions, the response and the caution', async () => {
    for (const size of ['A4', 'Letter'] as const) {
      await page.getByTestId('board-page').selectOption(size);
      const file = `test-results/board-print-${size}.pdf`;
      writeFileSync(file, await page.pdf({ preferCSSPageSize: true, printBackground: true }));
      const info = pdfInfo(file);
      expect(info.pages).toBe(1);
      expect([Math.round(info.widthPt), Math.round(info.heightPt)]).toEqual(size === 'A4' ? [595, 842] : [612, 792]);
      const text = pdfWords(file);
      expect(text).toContain(CAUTION);
      // Only the page prints: none of the app's own screen.
      expect(text).not.toContain('All patients');
      for (const v of followup.visits.slice(1)) expect(text).toContain(`${v.id} ${v.date}`);
      expect(text).toContain(`Response at ${followup.visits.at(-1)!.id}`);
      for (const t of followup.tracks) {
        expect(text).toContain(t.id);
        for (const v of followup.visits) if (t.status[v.id] === 'present') expect(text).toContain(t.lesions[v.id]);
      }
      spawnSync('pdftoppm', ['-png', '-r', '60', '-singlefile', file, `test-results/board-print-${size}`]);
    }
    await page.getByTestId('board-page').selectOption('A4');
  });

  it('exports the same case form as falciform report, and a segment map nibabel reads as the CLI\'s', async () => {
    const [csvDownload] = await Promise.all([page.waitForEvent('download'), page.getByTestId('board-csv').click()]);
    expect(csvDownload.suggestedFilename()).toBe('DEMO-0001-case-form.csv');
    const appCsv = readFileSync((await csvDownload.path())!, 'utf8');
    const cliCsv = readFileSync(join(dir, 'cli', 'case-form.csv'), 'utf8');
    expect(parse(appCsv, { columns: true })).toEqual(parse(cliCsv, { columns: true }));

    const [mapDownload] = await Promise.all([page.waitForEvent('download'), page.locator('[data-testid="board-map"][data-visit="v2"]').click()]);
    expect(mapDownload.suggestedFilename()).toBe('DEMO-0001-segments-v2.nii.gz');
    const exported = join(dir, 'app-segments-v2.nii.gz');
    await mapDownload.saveAs(exported);
    const job = join(dir, 'job.json');
    writeFileSync(job, JSON.stringify([{ visit: 'v2', exported, reference: join(dir, 'cli', 'segments-v2.nii.gz') }]));
    const py = spawnSync('/usr/bin/python3', ['tests/report/segment_maps.py', job], { encoding: 'utf8' });
    expect(py.stderr).toBe('');
    const [r] = JSON.parse(py.stdout) as { labelsEqual: boolean; maxAffineDiff: number }[];
    expect(r.labelsEqual).toBe(true);
    expect(r.maxAffineDiff).toBeLessThan(1e-4);
  });

  it('pseudonymises the page and the exports', async () => {
    await page.getByTestId('board-pseudonymise').check();
    await page.getByTestId('board-key').fill('board key');
    await expect.poll(async () => words(await sheet().getByTestId('board-patient').textContent())).toMatch(/^PS-[0-9A-F]{12}/);
    const text = words(await sheet().textContent());
    expect(text).not.toContain('DEMO-0001');
    expect(text).not.toContain('1958');
    expect(text).toContain('keyed pseudonym');
    const [csvDownload] = await Promise.all([page.waitForEvent('download'), page.getByTestId('board-csv').click()]);
    expect(csvDownload.suggestedFilename()).toMatch(/^PS-[0-9A-F]{12}-case-form\.csv$/);
    expect(readFileSync((await csvDownload.path())!, 'utf8')).not.toContain('DEMO-0001');
    await page.screenshot({ path: 'test-results/board-tab-pseudonymised.png', fullPage: true });
    expect(errors).toEqual([]);
  });
});
