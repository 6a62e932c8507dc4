import { existsSync, mkdirSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { launchChromium, watchErrors } from './browser.js';

const num = (s: string | null) => Number((s ?? '').replace(/[^0-9.]/g, ''));

// The Remnant tab on a demo patient: the volumes shown add up, and a named resection leaves the
// segments the Brisbane 2000 terminology keeps, with the remnant and its share read off the table.
describe('remnant planning in the browser', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;
  let errors: string[];

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
    server = await startWebServer('build/renderer');
    browser = await launchChromium();
    page = await (await browser.newContext({ viewport: { width: 1400, height: 1000 } })).newPage();
    errors = watchErrors(page);
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  it('right hemihepatectomy on DEMO-0001: remnant = the tumour-free volumes of I–IV shown', async () => {
    await page.goto(server.url);
    // Demo patients are imported on first start.
    await page.locator('[data-patient="DEMO-0001"]').waitFor({ timeout: 60_000 });
    await page.goto(`${server.url}#/patient/DEMO-0001`);
    await page.getByTestId('tab-remnant').click();
    await page.getByTestId('volumetry-table').waitFor({ timeout: 60_000 });

    // Latest visit by default; it has marks only, so the tumour volumes are flagged as estimates.
    expect(await page.getByTestId('remnant-visit').inputValue()).toBe('v4');
    expect(await page.getByTestId('estimate-flag').textContent()).toMatch(/Estimated tumour volumes/);
    expect(await page.getByTestId('segment-sum-check').textContent()).toMatch(/^✓ Segment volumes add up/);

    await page.getByTestId('remnant-preset').selectOption({ label: await optionLabel(page, 'Right hemihepatectomy') });
    await page.getByTestId('remnant-plan').waitFor();
    expect(await page.getByTestId('remnant-label').textContent()).toBe('Right hemihepatectomy (removes V, VI, VII, VIII)');

    const rows = page.getByTestId('volumetry-row');
    const shown: { segment: string; removed: boolean; tumourFreeMl: number }[] = [];
    for (let n = 0; n < (await rows.count()); n++) {
      const row = rows.nth(n);
      shown.push({
        segment: (await row.getAttribute('data-segment'))!,
        removed: (await row.getAttribute('data-removed')) === 'true',
        tumourFreeMl: num(await row.getByTestId('tumour-free-ml').textContent()),
      });
    }
    // Brisbane 2000 (Strasberg et al., HPB 2000;2:333-339): a right hemihepatectomy takes V–VIII.
    expect(shown.filter((r) => r.removed).map((r) => r.segment)).toEqual(['V', 'VI', 'VII', 'VIII']);
    const kept = shown.filter((r) => !r.removed);
    expect(kept.map((r) => r.segment).filter((s) => !['I', 'II', 'III', 'IV', 'IVa', 'IVb'].includes(s))).toEqual([]);

    // Each figure is shown to 0.1 mL, so sums of shown figures agree within half a unit per figure.
    const remnantMl = num(await page.getByTestId('remnant-ml').textContent());
    const keptSum = kept.reduce((a, r) => a + r.tumourFreeMl, 0);
    expect(Math.abs(remnantMl - keptSum)).toBeLessThanOrEqual(0.05 * (kept.length + 1) + 1e-9);
    const totalMl = num(await page.getByTestId('tumour-free-total').textContent());
    expect(Math.abs(totalMl - shown.reduce((a, r) => a + r.tumourFreeMl, 0))).toBeLessThanOrEqual(0.05 * (shown.length + 1) + 1e-9);
    const sharePct = num(await page.getByTestId('remnant-share').textContent());
    expect(Math.abs(sharePct - (100 * remnantMl) / totalMl)).toBeLessThan(0.1);

    // DEMO-0001's height and weight are known: the standardised remnant and the three cautions show.
    expect(await page.getByTestId('bsa').textContent()).toMatch(/^\d\.\d\d m²$/);
    expect(await page.getByTestId('standardised-share').textContent()).toMatch(/^\d+\.\d%$/);
    expect(await page.getByTestId('remnant-caution').count()).toBe(3);
    expect(await page.getByTestId('cautions-note').textContent()).toMatch(/local protocols decide/);

    mkdirSync('test-results', { recursive: true });
    await page.screenshot({ path: 'test-results/remnant-tab.png', fullPage: true });
    expect(errors).toEqual([]);
  });

  it('ticking a segment by hand changes the plan to the ticked segments', async () => {
    await page.getByTestId('remove-VI').uncheck();
    expect(await page.getByTestId('remnant-label').textContent()).toBe('Chosen segments (removes V, VII, VIII)');
    expect(await page.getByTestId('remnant-preset').inputValue()).toBe('');
    expect(errors).toEqual([]);
  });

  it('DEMO-0003: a lesion with a margin alert that stays in the remnant; height and weight changed here', async () => {
    await page.goto(`${server.url}#/patient/DEMO-0003?tab=remnant`);
    await page.getByTestId('volumetry-table').waitFor({ timeout: 60_000 });
    expect(await page.getByTestId('estimate-flag').count()).toBe(0); // lesion masks: measured tumour
    await page.getByTestId('remnant-preset').selectOption({ label: await optionLabel(page, 'Left lateral sectionectomy') });
    // A lies in VIII with a margin alert at the latest visit (the demo story); VIII stays.
    expect(await page.getByTestId('remnant-alerts').textContent()).toMatch(/A \(L1\) in VIII, .* mm from .*: would stay in the remnant/);

    // Body surface area by Mosteller (N Engl J Med 1987;317:1098): √(180 × 90 / 3600) = 2.12 m².
    await page.getByTestId('body-size').getByRole('button', { name: 'Change' }).click();
    await page.getByTestId('body-height').fill('180');
    await page.getByTestId('body-weight').fill('90');
    await page.getByTestId('body-save').click();
    await expect.poll(() => page.getByTestId('bsa').textContent()).toBe('2.12 m²');
    expect(await page.getByTestId('body-size').textContent()).toMatch(/^Height 180 cm, weight 90 kg\./);
    await page.screenshot({ path: 'test-results/remnant-alerts.png', fullPage: true });
    expect(errors).toEqual([]);
  });
});

/** The full text of the preset's option (it carries the alternative names and the segments). */
async function optionLabel(page: Page, name: string): Promise<string> {
  const labels = await page.getByTestId('remnant-preset').locator('option').allTextContents();
  const label = labels.find((l) => l.startsWith(`${name} (`) || l.startsWith(`${name} —`));
  if (!label) throw new Error(`no option for ${name} among ${labels.join(' | ')}`);
  return label;
}
