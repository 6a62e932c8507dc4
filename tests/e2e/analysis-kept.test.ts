import { existsSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { launchChromium, watchErrors } from './browser.js';

// Reopening a patient in the same session shows the analysis kept from the first open, without
// starting the analysis worker again; an edit to the stored patient makes the next open analyse anew.
const RENDERER = process.env.FALCIFORM_TEST_RENDERER ?? 'build/renderer';
const ID = 'DEMO-0001';

describe('the analysis kept between opens of a patient', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;
  let errors: string[];

  beforeAll(async () => {
    if (!existsSync(join(RENDERER, 'index.html'))) throw new Error('build the renderer first: npx vite build');
    mkdirSync('test-results', { recursive: true });
    server = await startWebServer(RENDERER);
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 } });
    // Counts the analysis workers the page starts (the bundle names the worker's file after its module).
    await context.addInitScript(() => {
      const Base = window.Worker;
      const w = window as unknown as { analysisRuns: number };
      w.analysisRuns = 0;
      window.Worker = class extends Base {
        constructor(url: string | URL, opts?: WorkerOptions) {
          super(url, opts);
          if (String(url).includes('analysis.worker')) w.analysisRuns++;
        }
      };
    });
    page = await context.newPage();
    errors = watchErrors(page);
    await page.goto(server.url);
    await page.locator(`[data-patient="${ID}"]`).waitFor({ timeout: 90_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  const runs = () => page.evaluate(() => (window as unknown as { analysisRuns: number }).analysisRuns);

  async function openCourse() {
    await page.evaluate((h) => { window.location.hash = h; }, `#/patient/${ID}?tab=course`);
    await page.getByTestId('chart-response').waitFor({ timeout: 90_000 });
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 90_000 });
  }

  async function leave() {
    await page.evaluate(() => { window.location.hash = '#/'; });
    await page.locator(`[data-patient="${ID}"]`).waitFor({ timeout: 30_000 });
  }

  it('a second open starts no analysis; after an edit the next open analyses again and shows the edit', async () => {
    await openCourse();
    const first = await runs();
    expect(first).toBe(1);
    const lines = await page.locator('.treatment-line').count();
    await leave();
    await openCourse();
    expect(await runs()).toBe(first);
    expect(await page.locator('.treatment-line').count()).toBe(lines);
    await page.screenshot({ path: 'test-results/course-reopened.png', fullPage: true });

    // An edit (a treatment event, stored with the patient and read by the analysis) forgets the kept result.
    await page.getByTestId('treatment-date').fill('2026-05-18');
    await page.getByTestId('treatment-kind').selectOption('resection');
    await page.getByTestId('treatment-label').fill('Resection, segment II');
    await page.getByTestId('treatment-add').click();
    // One event line per chart (four charts, as on the course tab's own test).
    await expect.poll(() => page.locator('.treatment-line').count()).toBe(lines + 4);
    await leave();
    await openCourse();
    expect(await runs()).toBe(first + 1);
    expect(await page.locator('.treatment-line').count()).toBe(lines + 4);
    expect(errors).toEqual([]);
  });
});
