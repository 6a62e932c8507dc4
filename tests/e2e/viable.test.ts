import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import type { FollowupResult } from '../../src/followup/followup.js';
import { launchChromium, watchErrors } from './browser.js';

// Viable tumour (mRECIST) in the app, on the demo patient DEMO-0002 (hepatocellular carcinoma, read
// by mRECIST): the viable-tumour mask drawn as its own overlay with its legend entry and toggle, the
// viable diameter in the lesion table and the track table (the figures `falciform followup` prints),
// and the mark editor's viable field. Screenshots go to test-results/ for a reader to look at.
describe('viable tumour in the viewer and the tables', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;
  let errors: string[];
  let followup: FollowupResult;

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
    if (!existsSync('build/src/cli/main.js')) throw new Error('build the command line first: npx tsc -p tsconfig.node.json');
    mkdirSync('test-results', { recursive: true });
    followup = JSON.parse(execFileSync(process.execPath, ['bin/falciform.js', 'followup', 'demo-data/DEMO-0002/manifest.json', '--json'], { encoding: 'utf8' }));
    server = await startWebServer('build/renderer');
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    page = await context.newPage();
    errors = watchErrors(page);
    await page.goto(server.url);
    await page.locator('[data-patient="DEMO-0002"]').waitFor({ timeout: 90_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  const viewer = () => page.getByTestId('slice-viewer');
  const pixels = () => page.getByTestId('slice-canvas').evaluate((c) => (c as HTMLCanvasElement).toDataURL());
  const openVisit = async (visit: string) => {
    await page.evaluate((h) => { window.location.hash = h; }, `#/patient/DEMO-0002/visit/${visit}`);
    await viewer().waitFor({ timeout: 90_000 });
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 90_000 });
    await page.getByTestId('lesion-table').waitFor();
  };

  it('v1: the viable mask is its own overlay (legend, toggle, V key); the lesion table shows the viable diameter', async () => {
    await openVisit('v1');
    await page.getByTestId('viable-legend').waitFor();
    expect(await page.getByTestId('viable-legend').textContent()).toMatch(/Viable tumour.*never across necrosis/);
    // The lesion table's viable column holds the figure `falciform followup` gives for the lesion.
    const expected = followup.visits[0].viableAxialMm!;
    const rows = await page.getByTestId('lesion-row').evaluateAll((els) => els.map((e) => [e.getAttribute('data-lesion'), e.querySelector('[data-testid="lesion-viable"]')?.textContent]));
    expect(rows.length).toBeGreaterThan(0);
    for (const [id, text] of rows) expect(text).toBe(expected[id!]!.toFixed(1));
    expect(await page.locator('[data-testid="lesion-table"] thead').textContent()).toMatch(/Viable/);

    // To the lesion's slice; the overlay changes the image, the toggle and the V key take it away and back.
    await page.locator('[data-testid="lesion-row"]').first().click();
    await expect.poll(() => viewer().getAttribute('data-image')).toBeTruthy();
    await page.waitForTimeout(300);
    const withViable = await pixels();
    await page.getByTestId('viable-toggle').uncheck();
    await expect.poll(pixels).not.toBe(withViable);
    const without = await pixels();
    await viewer().focus();
    await page.keyboard.press('v');
    expect(await page.getByTestId('viable-toggle').isChecked()).toBe(true);
    await expect.poll(pixels).not.toBe(without);
    await page.screenshot({ path: 'test-results/viewer-viable.png' });
    expect(errors).toEqual([]);
  });

  it('v2: the mark editor stores a viable diameter, and refuses one longer than the mark', async () => {
    await openVisit('v2');
    await page.locator('[data-testid="lesion-row"][data-lesion="M1"]').click();
    await page.getByTestId('mark-editor').waitFor();
    const field = page.getByTestId('mark-viable');
    expect(await field.inputValue()).toBe('0.0');
    // The marks file's rule (viable ≤ longest, src/lesions/marks.ts): 40 mm on a 31 mm mark is refused in place.
    await field.fill('40');
    expect(await page.locator('[data-testid="mark-editor"] .field-problem').textContent()).toMatch(/between 0 and 31\.0 mm/);
    expect(await page.getByTestId('save-viable').isDisabled()).toBe(true);
    await field.fill('4.5');
    await page.getByTestId('save-viable').click();
    await expect.poll(() => page.getByTestId('edit-notice').textContent()).toBe('Viable diameter of M1 saved: 4.5 mm.');
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 90_000 });
    await expect.poll(() => page.locator('[data-testid="lesion-row"][data-lesion="M1"] [data-testid="lesion-viable"]').textContent(), { timeout: 60_000 }).toBe('4.5');
    await page.screenshot({ path: 'test-results/viewer-mark-viable.png' });
    expect(errors).toEqual([]);
  });

  it('the track table shows each lesion\'s viable diameter beside its size', async () => {
    await page.evaluate((h) => { window.location.hash = h; }, '#/patient/DEMO-0002?tab=tracks');
    await page.getByTestId('track-table').waitFor({ timeout: 90_000 });
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 90_000 });
    const t1 = followup.tracks[0];
    const cell = page.locator(`[data-testid="track-row"][data-track="${t1.id}"] td[data-visit="v1"] [data-testid="track-viable"]`);
    expect(await cell.textContent()).toBe(` · viable ${t1.viableAxialMm!.v1} mm`);
    // The mark edited above: 4.5 mm viable at v2.
    await expect.poll(() => page.locator(`[data-testid="track-row"][data-track="${t1.id}"] td[data-visit="v2"] [data-testid="track-viable"]`).textContent()).toBe(' · viable 4.5 mm');
    // The trail keeps the change in words, before and after.
    expect((await page.getByTestId('trail-row').allTextContents())[0]).toMatch(/lesion changed \(v2\/M1, viable diameter\)0 mm4\.5 mm$/);
    await page.screenshot({ path: 'test-results/tracks-viable.png', fullPage: true });
    expect(errors).toEqual([]);
  });

  it('the board summary shows the viable diameter beside the longest in the lesion table', async () => {
    await page.getByTestId('tab-board').click();
    const sheet = page.getByTestId('board-preview').getByTestId('board-sheet');
    await sheet.waitFor({ timeout: 60_000 });
    const t1 = followup.tracks[0];
    const row = (await sheet.locator(`tr[data-track="${t1.id}"]`).textContent())!.replace(/\s+/g, ' ');
    expect(row).toContain(`${t1.longestAxialMm.v1!.toFixed(1)} viable ${t1.viableAxialMm!.v1!.toFixed(1)}`);
    expect((await sheet.textContent())!.replace(/\s+/g, ' ')).toContain('then the viable (enhancing) diameter (mm, mRECIST)');
    await page.screenshot({ path: 'test-results/board-viable.png', fullPage: true });
    expect(errors).toEqual([]);
  });
});
