import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { lineX, PORTAL_Y, RIGHT_HEPATIC_VEIN } from '../../src/report/diagram-layout.js';
import { patientFolder, writeFiles } from '../store/fixtures.js';
import { launchChromium, watchErrors } from './browser.js';

// What a reader meets on the screens: a lesion crossing a segment border drawn on that border with its
// shares (DEMO-0003's lesion in VIII grows across the border with VII by its last visit, by the demo
// scenario's design), and loose files imported into a stored patient picked from a list, a new
// patient made only when asked for.
describe('reader round in the browser', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;
  let errors: string[];
  let dir: string;

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
    mkdirSync('test-results', { recursive: true });
    dir = mkdtempSync(join(tmpdir(), 'falciform-reader-'));
    const loose = patientFolder({ id: 'X', oneVisit: true }).filter((f) => f.relativePath.includes('/v1/'));
    writeFiles(join(dir, 'loose'), loose.map((f) => ({ ...f, relativePath: f.relativePath.replace('X/v1/', '') })));
    server = await startWebServer('build/renderer');
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: { width: 1440, height: 1000 } });
    page = await context.newPage();
    errors = watchErrors(page);
    await page.goto(server.url);
    await page.locator('[data-patient="DEMO-0003"]').waitFor({ timeout: 90_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('draws a lesion that crosses a border on that border, with its share in each segment', async () => {
    await page.goto(`${server.url}#/patient/DEMO-0003`);
    await page.getByTestId('tab-diagram').click();
    const crossing = page.locator('[data-testid="diagram-lesion"][data-crossing]:not([data-crossing=""])');
    await crossing.first().waitFor({ timeout: 90_000 });
    expect(await crossing.count()).toBe(1);
    const [a, b] = (await crossing.getAttribute('data-crossing'))!.split('|');
    expect([a, b].sort()).toEqual(['VII', 'VIII']);
    // On the drawing, VII and VIII meet on the right hepatic vein's line above the portal line.
    const dot = crossing.locator('circle.lesion-dot');
    const cx = Number(await dot.getAttribute('cx'));
    const cy = Number(await dot.getAttribute('cy'));
    expect(cy).toBeLessThan(PORTAL_Y);
    expect(Math.abs(cx - lineX(RIGHT_HEPATIC_VEIN, cy))).toBeLessThan(0.5);
    // Its shares, written beside it and in the table, add up to the whole lesion.
    const title = (await crossing.locator('title').textContent())!;
    const shares = [...title.matchAll(/\b(VIII|VII) (\d+)%/g)].map((m) => Number(m[2]));
    expect(shares).toHaveLength(2);
    expect(Math.abs(shares[0] + shares[1] - 100)).toBeLessThanOrEqual(1);
    const track = await crossing.getAttribute('data-track');
    const row = page.locator(`[data-testid="diagram-row"][data-lesion="${await crossing.getAttribute('data-lesion')}"]`);
    expect(await row.getByTestId('diagram-segment').textContent()).toMatch(/crosses: VIII? \d+% \/ VIII? \d+%/);
    const label = page.locator('text.diagram-lesion-name', { hasText: track! });
    expect(await label.textContent()).toMatch(new RegExp(`^${track} VIII? \\d+% / VIII? \\d+%$`));
    // The key says positions are schematic, and the map built from landmarks says it is an approximation.
    expect(await page.locator('[data-key="scale"]').textContent()).toMatch(/^Positions schematic/);
    await page.getByTestId('segment-diagram').screenshot({ path: 'test-results/diagram-crossing.png' });
    await page.screenshot({ path: 'test-results/diagram-tab.png', fullPage: true });
  });

  it('signs each change in the edit trail with the reader name set once in the app; dates are typed as YYYY-MM-DD', async () => {
    await page.goto(server.url);
    await page.getByTestId('reader-change').click();
    await page.getByTestId('reader-input').fill('R. Reader');
    await page.getByTestId('reader-save').click();
    expect(await page.getByTestId('reader-name').textContent()).toContain('Reader: R. Reader');
    await page.goto(`${server.url}#/patient/DEMO-0001`);
    await page.getByTestId('tab-course').click();
    const date = page.getByTestId('treatment-date');
    await date.waitFor({ timeout: 90_000 });
    expect(await date.getAttribute('placeholder')).toBe('YYYY-MM-DD');
    await date.fill('2026-05-18');
    await page.getByTestId('treatment-label').fill('Ablation of a lesion in II');
    await page.getByTestId('treatment-add').click();
    await page.getByTestId('treatment-row').filter({ hasText: 'Ablation of a lesion in II' }).waitFor();
    await page.getByTestId('tab-tracks').click();
    const newest = page.getByTestId('trail-row').first();
    await newest.waitFor();
    expect(await newest.getAttribute('data-entity')).toBe('treatment');
    expect(await newest.getByTestId('trail-by').textContent()).toBe('R. Reader');
    await page.getByTestId('trail').screenshot({ path: 'test-results/trail-reader.png' });
  });

  it('imports loose files into a stored patient picked from the list, and asks before making a new one', async () => {
    await page.goto(server.url);
    const visitsOf = async (id: string) => Number((await page.locator(`[data-patient="${id}"] td`).first().textContent()) ?? 'NaN');
    await page.locator('[data-patient="DEMO-0002"]').waitFor();
    const before = await visitsOf('DEMO-0002');
    const open = async () => {
      await page.getByTestId('files-input').setInputFiles(['scan.nii.gz', 'segments.nii.gz', 'lesions.nii.gz'].map((f) => join(dir, 'loose', f)));
      await page.getByTestId('loose-dialog').waitFor();
    };
    await open();
    const options = await page.getByTestId('loose-existing').locator('option').allTextContents();
    expect(options).toEqual(expect.arrayContaining(['New patient…', 'DEMO-0001', 'DEMO-0002', 'DEMO-0003']));
    // A typo of a stored id: pointed out, and no patient is made without the box ticked.
    await page.getByTestId('loose-patient').fill('demo 0002');
    await page.getByTestId('loose-date').fill('2026-09-01');
    expect(await page.getByTestId('loose-close').textContent()).toContain('DEMO-0002');
    await page.getByTestId('dialog-confirm').click();
    expect(await page.getByTestId('loose-problem').textContent()).toMatch(/No patient demo 0002 is stored\. Tick "Create new patient"/);
    await page.screenshot({ path: 'test-results/loose-picker-typo.png' });
    // Picked from the list, the visit goes to the stored patient.
    await page.getByTestId('loose-existing').selectOption('DEMO-0002');
    expect(await page.getByTestId('loose-patient').count()).toBe(0);
    await page.getByTestId('dialog-confirm').click();
    await page.getByTestId('import-done').waitFor({ timeout: 90_000 });
    await expect.poll(() => visitsOf('DEMO-0002')).toBe(before + 1);
    expect(await page.locator('[data-patient="demo 0002"]').count()).toBe(0);
    await page.screenshot({ path: 'test-results/loose-picker-done.png' });
    expect(errors).toEqual([]);
  });
});
