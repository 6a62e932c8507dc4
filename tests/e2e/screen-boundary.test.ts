import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { launchChromium } from './browser.js';

// A record the app cannot draw (stored before restores were checked) takes down its screen only:
// the boundary says what failed, offers a backup of the store, and the rest of the app still works.
describe('a screen that fails while drawing', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npm run build:renderer');
    server = await startWebServer('build/renderer');
    browser = await launchChromium();
    page = await (await browser.newContext({ acceptDownloads: true })).newPage();
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  it('shows what failed and the backup button, while the header, caution and navigation keep working', async () => {
    await page.goto(server.url);
    await page.getByTestId('patient-row').first().waitFor({ timeout: 90_000 });
    // A patient whose label is an object: React cannot draw it as text, so the patient list throws.
    await page.evaluate(() => new Promise<void>((resolve, reject) => {
      const open = indexedDB.open('falciform');
      open.onerror = () => reject(open.error);
      open.onsuccess = () => {
        const tx = open.result.transaction('patients', 'readwrite');
        tx.objectStore('patients').put({ id: 'BROKEN-1', label: { text: 'bed 4' }, marginMm: 10, createdAt: '2026-06-01T08:00:00.000Z' });
        tx.oncomplete = () => { open.result.close(); resolve(); };
        tx.onerror = () => reject(tx.error);
      };
    }));
    await page.reload();
    const failed = page.getByTestId('screen-failed');
    await failed.waitFor({ timeout: 60_000 });
    expect(await failed.getByText('Falciform could not show the patient list.').isVisible()).toBe(true);
    expect(await page.getByTestId('screen-failed-problem').textContent()).toMatch(/Objects are not valid as a React child|Minified React error #31/);
    expect(await page.locator('.app-header').isVisible()).toBe(true);
    expect(await page.locator('.app-footer').textContent()).toMatch(/\S/);
    mkdirSync('test-results', { recursive: true });
    await page.screenshot({ path: 'test-results/screen-boundary.png', fullPage: true });

    // The backup button saves the whole store, the broken record included, as an ordinary backup file.
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('screen-failed-backup').click()]);
    expect(download.suggestedFilename()).toMatch(/^falciform-backup-all-patients-\d{4}-\d{2}-\d{2}\.falciform$/);
    const bytes = readFileSync((await download.path())!);
    expect(new TextDecoder().decode(bytes.subarray(0, 16))).toBe('FALCIFORM-BACKUP');
    expect(bytes.includes(Buffer.from('"BROKEN-1"'))).toBe(true);
    await page.getByTestId('screen-failed-saved').waitFor();

    // Navigation still works: the About page draws, and the failed screen is gone.
    await page.locator('.about-link').click();
    await page.waitForURL(/#\/about$/);
    expect(await page.getByTestId('screen-failed').count()).toBe(0);
    expect(await page.locator('.app-main').textContent()).toMatch(/Falciform/);
    // Another patient's page draws as usual.
    await page.goto(`${server.url}#/patient/DEMO-0001`);
    await page.locator('.app-main h2').first().waitFor({ timeout: 60_000 });
    expect(await page.getByTestId('screen-failed').count()).toBe(0);
    await page.screenshot({ path: 'test-results/screen-boundary-after.png', fullPage: true });
  }, 240_000);
});
