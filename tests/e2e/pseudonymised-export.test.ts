import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { CAUTION } from '../../src/caution.js';
import { pdfWords } from '../report/pdf.js';
import { launchChromium, watchErrors } from './browser.js';

// A pseudonymised export from the Board summary tab in headless Chromium, on the demo patient
// DEMO-0001: the key is remembered as a setting, and the case form is the one `falciform report
// --pseudonymise` writes with the same key (FALCIFORM_PSEUDONYM_KEY), shifted dates and all. The page,
// its PDF (page.pdf, print media, read back with pdftotext) and the CSV hold neither the id, nor a
// real visit date, nor an absolute path. DICOM PS3.15 Annex E (basic profile) as the reference.

const MANIFEST = 'demo-data/DEMO-0001/manifest.json';
const KEY = 'clinic export key';
const ABSOLUTE_PATH = /(?:^|[\s"'(=,;])(?:[A-Za-z]:)?[/\\](?:[^\s/\\"'<>]+[/\\])+[^\s/\\"'<>]+/;

describe('a pseudonymised export from the app', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;
  let errors: string[];
  let dir: string;
  let realDates: string[];

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
    mkdirSync('test-results', { recursive: true });
    dir = mkdtempSync(join(tmpdir(), 'falciform-pseudo-'));
    realDates = (JSON.parse(readFileSync(MANIFEST, 'utf8')) as { visits: { date: string }[] }).visits.map((v) => v.date);
    const r = spawnSync(process.execPath, ['bin/falciform.js', 'report', MANIFEST, '--out', join(dir, 'cli'), '--no-pdf', '--pseudonymise'], {
      encoding: 'utf8', env: { ...process.env, FALCIFORM_PSEUDONYM_KEY: KEY },
    });
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

  it('exports the case form and the page with shifted dates, no id and no path, as the command line does', async () => {
    await page.goto(server.url);
    await page.locator('[data-patient="DEMO-0001"]').waitFor({ timeout: 90_000 });
    // The lesion cap is on screen, at the command line's default.
    expect(words(await page.getByTestId('lesion-cap').textContent())).toContain('Lesion cap: 1000 per visit');
    await page.goto(`${server.url}#/patient/DEMO-0001`);
    await page.getByTestId('tab-board').click();
    await sheet().waitFor({ timeout: 60_000 });
    await page.getByTestId('board-pseudonymise').check();
    await page.getByTestId('board-key').fill(KEY);
    await page.getByTestId('board-key').blur();
    await expect.poll(async () => words(await sheet().getByTestId('board-patient').textContent())).toMatch(/^PS-[0-9A-F]{12}/);

    const text = words(await sheet().textContent());
    expect(text).toContain(CAUTION);
    expect(text).toMatch(/Dates are shifted \d+ days (later|earlier)/);
    expect(text).not.toContain('DEMO-0001');
    for (const d of realDates) expect(text).not.toContain(d);
    const html = await sheet().innerHTML();
    expect(html).not.toMatch(ABSOLUTE_PATH);

    const [csvDownload] = await Promise.all([page.waitForEvent('download'), page.getByTestId('board-csv').click()]);
    const appCsv = readFileSync((await csvDownload.path())!, 'utf8');
    expect(appCsv).not.toContain('DEMO-0001');
    expect(appCsv).not.toMatch(ABSOLUTE_PATH);
    for (const d of realDates) expect(appCsv).not.toContain(d);
    const rows = parse(appCsv, { columns: true }) as Record<string, string>[];
    expect(new Set(rows.map((r) => r.dates_shifted))).toEqual(new Set(['yes']));
    // The same key gives the same pseudonym and the same shift as `falciform report`.
    expect(rows).toEqual(parse(readFileSync(join(dir, 'cli', 'case-form.csv'), 'utf8'), { columns: true }));
    expect(await page.getByTestId('board-status').textContent()).toContain('its dates are shifted');
    await page.screenshot({ path: 'test-results/board-pseudonymised-export.png', fullPage: true });

    // The segment map: named by the pseudonym; its NIfTI-1 descrip (80 bytes at offset 148, nifti1.h)
    // says DEMO for the demo patient and holds neither the id nor a date.
    const [mapDownload] = await Promise.all([page.waitForEvent('download'), page.locator('[data-testid="board-map"][data-visit="v2"]').click()]);
    expect(mapDownload.suggestedFilename()).toMatch(/^PS-[0-9A-F]{12}-segments-v2\.nii\.gz$/);
    const nifti = gunzipSync(readFileSync((await mapDownload.path())!));
    const descrip = new TextDecoder().decode(nifti.subarray(148, 228)).replace(/\0+$/, '');
    expect(descrip).toMatch(/segment map v2 DEMO; not a medical device$/);
    expect(descrip).not.toContain('DEMO-0001');
    expect(descrip).not.toMatch(/\d{4}-\d{2}-\d{2}/);

    await page.emulateMedia({ media: 'print' });
    const pdf = join(dir, 'board.pdf');
    await page.pdf({ path: pdf, format: 'A4', printBackground: true });
    await page.emulateMedia({ media: 'screen' });
    const printed = pdfWords(pdf);
    expect(printed).toMatch(/PS-[0-9A-F]{12}/);
    expect(printed).not.toContain('DEMO-0001');
    for (const d of realDates) expect(printed).not.toContain(d);
    spawnSync('pdftoppm', ['-png', '-r', '60', '-singlefile', pdf, 'test-results/board-pseudonymised-print']);
  });

  it('remembers the key as a setting: reopening the tab gives the same pseudonym', async () => {
    const before = words(await sheet().getByTestId('board-patient').textContent());
    await page.reload();
    await page.getByTestId('tab-board').click();
    await sheet().waitFor({ timeout: 60_000 });
    await page.getByTestId('board-pseudonymise').check();
    await expect.poll(async () => await page.getByTestId('board-key').inputValue()).toBe(KEY);
    await expect.poll(async () => words(await sheet().getByTestId('board-patient').textContent())).toBe(before);
    expect(errors).toEqual([]);
  });

  it('a lesion cap set below a mask\'s lesions refuses it by name and count, as --max-lesions does', async () => {
    await page.getByTestId('lesion-cap-change').click();
    await page.getByTestId('lesion-cap-input').fill('2');
    await page.getByTestId('lesion-cap-save').click();
    expect(words(await page.getByTestId('lesion-cap').textContent())).toContain('Lesion cap: 2 per visit');
    await page.reload();
    // Visit v1 of DEMO-0001 has three lesions in its mask.
    const refusal = page.getByText(/holds 3 lesions \(26-connected components\), above the cap of 2 lesions per visit/).first();
    await refusal.waitFor({ timeout: 60_000 });
    expect(await refusal.textContent()).toMatch(/lesions/);
    await page.screenshot({ path: 'test-results/lesion-cap-refusal.png', fullPage: true });
    await page.getByTestId('lesion-cap-change').click();
    await page.getByTestId('lesion-cap-input').fill('1000');
    await page.getByTestId('lesion-cap-save').click();
  });
});
