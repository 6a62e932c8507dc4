import { existsSync, mkdirSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { LIVER_SCOPE_STATEMENT } from '../../src/followup/reader-calls.js';
import { launchChromium, watchErrors } from './browser.js';

// The reader's calls entered on the Visits tab: DEMO-0001 responds (PR at v2 by its targets, by the
// demo scenario's design); a reader's call of unequivocal progression of the non-target lesions makes
// the visit PD, as RECIST 1.1 table 1 (Eisenhauer 2009) has it, and taking the call back restores PR.
describe('reader\'s calls in the browser', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;
  let errors: string[];

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npm run build:renderer');
    mkdirSync('test-results', { recursive: true });
    server = await startWebServer('build/renderer');
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: { width: 1360, height: 1000 } });
    page = await context.newPage();
    errors = watchErrors(page);
    await page.goto(server.url);
    await page.locator('[data-patient="DEMO-0001"]').waitFor({ timeout: 90_000 });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  it('a non-target call of unequivocal progression makes the overall response PD', async () => {
    await page.getByTestId('reader-change').click();
    await page.getByTestId('reader-input').fill('R. Reader');
    await page.getByTestId('reader-save').click();
    await page.goto(`${server.url}#/patient/DEMO-0001`);
    const response = (visit: string) => page.locator(`[data-testid="visit-row"][data-visit="${visit}"] [data-testid="response"]`);
    await page.getByTestId('reader-calls').waitFor({ timeout: 90_000 });
    expect(await response('v2').textContent()).toBe('PR');
    // Said on the screen that shows the response (the follow-up's notes).
    expect(await page.locator('ul.notes').textContent()).toContain(LIVER_SCOPE_STATEMENT);

    await page.getByTestId('non-target-v2').selectOption('unequivocal-progression');
    await page.waitForFunction(() => document.querySelector('[data-testid="visit-row"][data-visit="v2"] [data-testid="response"]')?.textContent === 'PD', null, { timeout: 90_000 });
    expect(await response('v3').textContent()).toBe('PR');
    expect(await page.getByTestId('non-target-v2').inputValue()).toBe('unequivocal-progression');
    await page.getByTestId('outside-liver-v2').selectOption('stable');
    await page.waitForFunction(() => (document.querySelector('[data-testid="outside-liver-v2"]') as HTMLSelectElement | null)?.value === 'stable', null, { timeout: 90_000 });
    await page.screenshot({ path: 'test-results/reader-calls.png', fullPage: true });

    // The call survives a reload (it is stored), and taking it back restores the response by the targets.
    await page.reload();
    await page.getByTestId('reader-calls').waitFor({ timeout: 90_000 });
    await page.waitForFunction(() => document.querySelector('[data-testid="visit-row"][data-visit="v2"] [data-testid="response"]')?.textContent === 'PD', null, { timeout: 90_000 });
    await page.getByTestId('non-target-v2').selectOption('');
    await page.waitForFunction(() => document.querySelector('[data-testid="visit-row"][data-visit="v2"] [data-testid="response"]')?.textContent === 'PR', null, { timeout: 90_000 });
    expect(errors).toEqual([]);
  });

  it('a new lesion called equivocal is followed, not PD, until the call is taken back', async () => {
    // DEMO-0002 (mRECIST): the 15 mm lesion new in VI at v3 is unequivocal by its size, so v3 is PD; the
    // reader's equivocal call sets it aside (RECIST 1.1 section 4.3.5: a new lesion must be unequivocal).
    // The same call on the command line (--new-lesion v3:M2=equivocal) gives PR at v3.
    await page.goto(`${server.url}#/patient/DEMO-0002`);
    await page.getByTestId('reader-calls').waitFor({ timeout: 90_000 });
    const v3 = () => page.evaluate(() => document.querySelector('[data-testid="visit-row"][data-visit="v3"] [data-testid="response"]')?.textContent);
    expect(await v3()).toBe('PD');
    await page.getByTestId('new-lesion-v3-M2').selectOption('equivocal');
    await page.waitForFunction(() => document.querySelector('[data-testid="visit-row"][data-visit="v3"] [data-testid="response"]')?.textContent === 'PR', null, { timeout: 90_000 });
    await page.getByTestId('reader-calls').screenshot({ path: 'test-results/reader-calls-new-lesion.png' });
    await page.getByTestId('new-lesion-v3-M2').selectOption('');
    await page.waitForFunction(() => document.querySelector('[data-testid="visit-row"][data-visit="v3"] [data-testid="response"]')?.textContent === 'PD', null, { timeout: 90_000 });
    expect(errors).toEqual([]);
  });

  it('the alert list defines the margin to the border surface, and DEMO-0003 alerts as designed', async () => {
    await page.goto(`${server.url}#/patient/DEMO-0003`);
    await page.getByTestId('tab-alerts').click();
    await page.getByTestId('alert-table').waitFor({ timeout: 90_000 });
    expect(await page.locator('section[aria-labelledby="alerts-title"] .chart-note').textContent()).toMatch(/outer voxel faces to the border surface.*0 mm means the\s+lesion touches or spans the border/s);
    // Scenario: the lesion in VIII is inside the 10 mm margin at v2 and across the border at v3.
    expect(await page.getByTestId('alert-margin').allTextContents()).toHaveLength(2);
    await page.screenshot({ path: 'test-results/alerts-border-surface.png', fullPage: true });
    // The visit view's lesion table says the same of its margin column.
    await page.goto(`${server.url}#/patient/DEMO-0003/visit/v2`);
    await page.getByTestId('lesion-table').waitFor({ timeout: 90_000 });
    expect(await page.locator('[data-testid="lesion-table"] caption').textContent()).toMatch(/border surface of the nearest other segment \(0 when touching\), highlighted when at or within the set margin/);
    await page.getByTestId('lesion-table').screenshot({ path: 'test-results/lesion-table-margin.png' });
    expect(errors).toEqual([]);
  });
});
