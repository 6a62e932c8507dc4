import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { patientFolder, textFile, withFile, writeFiles } from '../store/fixtures.js';
import { launchChromium, watchErrors } from './browser.js';

// A visit whose target cannot be evaluated has no sum of diameters: RECIST 1.1 (Eisenhauer et al.
// 2009, section 4.4.2, from memory) makes the target response NE rather than a smaller sum. The
// patient: two lesions at baseline, the larger (track A) the one measurable target; at the second
// visit the reader marked nothing, so both tracks are missing inside the scanned field and not
// confirmed gone. The sum of the evaluable targets is then 0 mm, which must never reach the reader
// as "0.0 mm" or "−100%".
describe('NE target sum in the browser', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;
  let errors: string[];
  let dir: string;

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
    mkdirSync('test-results', { recursive: true });
    dir = mkdtempSync(join(tmpdir(), 'falciform-ne-'));
    const files = withFile(patientFolder({ id: 'NE-0001' }), 'NE-0001/v2/marks.json', textFile({ space: 'RAS', units: 'mm', marks: [] }));
    writeFiles(join(dir, 'in'), files);
    server = await startWebServer('build/renderer');
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: { width: 1440, height: 1000 }, acceptDownloads: true });
    page = await context.newPage();
    errors = watchErrors(page);
    await page.goto(server.url);
    await page.locator('[data-patient="DEMO-0001"]').waitFor({ timeout: 90_000 });
  }, 180_000);

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('imports the patient through the folder picker', async () => {
    const input = page.getByTestId('folder-input');
    await expect.poll(() => input.getAttribute('webkitdirectory')).not.toBeNull();
    await input.setInputFiles(join(dir, 'in', 'NE-0001'));
    await page.getByTestId('import-done').waitFor({ timeout: 90_000 });
    expect(await page.getByTestId('import-done').textContent()).toMatch(/Imported NE-0001: 2 visits imported/);
  });

  it('the Visits table shows NE for the sum and both changes, never 0.0 mm or −100%', async () => {
    await page.goto(`${server.url}#/patient/NE-0001`);
    const row = (visit: string) => page.locator(`[data-testid="visit-row"][data-visit="${visit}"]`);
    await row('v2').waitFor({ timeout: 90_000 });
    await expect.poll(() => row('v2').getByTestId('response').textContent(), { timeout: 90_000 }).toBe('NE');
    const cells = async (visit: string) => (await row(visit).locator('td').allTextContents()).map((s) => s.trim());
    // Columns: date, segment map, lesions, margin alerts, target sum, vs baseline, vs nadir, response, new.
    const [, , , , sum, vsBaseline, vsNadir, response] = await cells('v2');
    expect([sum, vsBaseline, vsNadir, response]).toEqual(['NE', 'NE', 'NE', 'NE']);
    // The baseline row keeps its measured sum (17 mm: L1's longest axial diameter, 16.97 mm, to one decimal).
    const base = await cells('v1');
    expect(base[4]).toMatch(/^17\.0 mm$/);
    const text = (await row('v2').textContent())!;
    expect(text).not.toMatch(/0\.0 mm|−100|-100/);
    await page.getByTestId('visit-table').screenshot({ path: 'test-results/ne-visits-table.png' });
  });

  it('the case-form CSV download carries NE for the sum and evaluation, and no −100%', async () => {
    await page.getByTestId('tab-board').click();
    await page.getByTestId('board-csv').waitFor({ timeout: 90_000 });
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('board-csv').click()]);
    const file = join(dir, download.suggestedFilename());
    await download.saveAs(file);
    const rows = parse(readFileSync(file, 'utf8'), { columns: true }) as Record<string, string>[];
    const summary = rows.find((r) => r.visit === 'v2' && r.row_type === 'visit')!;
    expect(summary).toMatchObject({ target_sum_mm: 'NE', evaluation: 'NE', response: 'NE', change_from_baseline_pct: '', change_from_nadir_pct: '' });
    // The target track A, missing and not confirmed gone: NE, not 0 mm.
    const a = rows.find((r) => r.visit === 'v2' && r.track === 'A')!;
    expect(a).toMatchObject({ status: 'gone', target: 'yes', longest_axial_mm: 'NE', evaluation: 'NE' });
    for (const r of rows.filter((x) => x.visit === 'v2')) expect([r.target_sum_mm, r.change_from_baseline_pct]).not.toContain('-100.0');
    expect(rows.find((r) => r.visit === 'v1' && r.row_type === 'visit')!.target_sum_mm).toBe('17');
    expect(await page.getByTestId('board-status').textContent()).toMatch(/Case form exported .*downloads folder/);
    await page.screenshot({ path: 'test-results/ne-board-tab.png' });
    expect(errors).toEqual([]);
  });
});
