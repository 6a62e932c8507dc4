import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { openBuiltApp, type OpenedApp } from './browser.js';

// The visit viewer in headless Chromium on the demo patients the app imports on first start:
// scroll the slices, mark a lesion with calipers and see it placed, move a landmark and see the
// segment map rebuilt. Screenshots go to test-results/ for a reader to look at.
describe('visit viewer', () => {
  let app: OpenedApp;
  let page: Page;
  let errors: string[];

  beforeAll(async () => {
    app = await openBuiltApp();
    ({ page, errors } = app);
  });

  afterAll(() => app?.close());

  const viewer = () => page.getByTestId('slice-viewer');
  const sliceNumber = async () => Number(await viewer().getAttribute('data-slice'));
  const pixels = () => page.getByTestId('slice-canvas').evaluate((c) => (c as HTMLCanvasElement).toDataURL());
  const segmentVolume = (s: string) => page.locator(`[data-testid="segment-volume"][data-segment="${s}"] td`).textContent();
  /** The analysis has settled when no progress line shows and the lesion table is there. */
  const settled = async () => {
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 60_000 });
    await page.getByTestId('lesion-table').waitFor();
  };
  /** The screen point over the image whose readout names a segment of the map, scanning a coarse grid. */
  const pointInSegment = async (): Promise<{ x: number; y: number; segment: string }> => {
    const box = (await viewer().boundingBox())!;
    for (let fy = 0.3; fy <= 0.7; fy += 0.05) {
      for (let fx = 0.25; fx <= 0.6; fx += 0.05) {
        const x = box.x + box.width * fx, y = box.y + box.height * fy;
        await page.mouse.move(x, y);
        const text = (await page.getByTestId('readout-segment').textContent()) ?? '';
        const m = /^segment (I|II|III|IV|IVa|IVb|V|VI|VII|VIII)$/.exec(text);
        if (m) return { x, y, segment: m[1] };
      }
    }
    throw new Error('no point of the image lies in a segment');
  };

  it('opens a demo visit and scrolls through its slices', async () => {
    await page.goto(app.url);
    // First start imports the invented demo patients.
    await page.locator('[data-patient="DEMO-0001"] [data-testid="open-patient"]').click({ timeout: 90_000 });
    await page.locator('[data-testid="visit-row"][data-visit="v2"] a').click();
    await viewer().waitFor();
    await settled();
    expect(await page.getByTestId('visit-title').textContent()).toMatch(/^Visit v2 · 2026-03-09$/);
    expect(await page.getByTestId('map-source').textContent()).toMatch(/Built from this visit's landmarks/);

    const first = await sliceNumber();
    const before = await pixels();
    await viewer().focus();
    for (let n = 0; n < 4; n++) await page.keyboard.press('ArrowUp');
    expect(await sliceNumber()).toBe(first + 4); // this scan's k axis runs towards superior
    expect(await page.getByTestId('slice-label').textContent()).toContain(`slice ${first + 5} of`);
    await expect.poll(pixels).not.toBe(before);
    const box = (await viewer().boundingBox())!;
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    await page.mouse.wheel(0, 120);
    await expect.poll(sliceNumber).toBe(first + 3);
    await page.keyboard.press('PageDown');
    await expect.poll(sliceNumber).toBe(first - 2);

    // O hides the segment colours and shows them again.
    const washed = await pixels();
    await page.keyboard.press('o');
    await expect.poll(pixels).not.toBe(washed);
    await page.keyboard.press('o');
    await expect.poll(pixels).toBe(washed);
    await page.screenshot({ path: 'test-results/viewer-axial.png' });

    await page.getByTestId('plane-coronal').click();
    await expect.poll(() => viewer().getAttribute('data-plane')).toBe('coronal');
    await page.screenshot({ path: 'test-results/viewer-coronal.png' });
    await page.getByTestId('plane-axial').click();
    expect(errors).toEqual([]);
  });

  it('marks a lesion with calipers and shows its segment and margin', async () => {
    await page.getByTestId('tool-mark').click();
    const { x, y, segment } = await pointInSegment();
    // Long axis across the point, then the short axis at right angles.
    await page.mouse.move(x - 14, y);
    await page.mouse.down();
    await page.mouse.move(x, y, { steps: 4 });
    await page.mouse.move(x + 14, y, { steps: 4 });
    await page.mouse.up();
    await page.getByTestId('draft-editor').waitFor();
    const longest = Number.parseFloat((await page.getByTestId('draft-longest').textContent()) ?? '');
    expect(longest).toBeGreaterThan(5);
    await page.mouse.move(x, y - 9);
    await page.mouse.down();
    await page.mouse.move(x, y + 9, { steps: 4 });
    await page.mouse.up();
    await expect.poll(async () => Number(await page.getByTestId('draft-short').inputValue())).toBeGreaterThan(0);
    await page.screenshot({ path: 'test-results/viewer-mark-draft.png' });
    await page.getByTestId('save-mark').click();

    // The visit has a lesion mask (L1, L2, …): the mark adds M1 to them.
    const row = page.locator('[data-testid="lesion-row"][data-lesion="M1"]');
    await row.waitFor({ timeout: 60_000 });
    await settled();
    expect(await row.getByTestId('lesion-segment').textContent()).toBe(segment);
    expect(await row.getByTestId('lesion-margin').textContent()).toMatch(/^\d+\.\d/);
    expect(await page.locator('[data-testid="lesion-row"][data-lesion="L1"]').count()).toBe(1);
    await page.screenshot({ path: 'test-results/viewer-mark-saved.png', fullPage: true });
    expect(errors).toEqual([]);
  });

  it('moves a landmark and the segment map is rebuilt', async () => {
    await page.getByTestId('tool-landmarks').click();
    await page.locator('[data-testid="landmark-row"][data-landmark="middle_hepatic_vein"]').getByRole('button', { name: 'Show' }).click();
    const handle = page.locator('[data-testid="landmark-handle"][data-landmark="middle_hepatic_vein"]');
    await handle.waitFor();
    // Show may leave the page scrolled to the landmark list, below the image: bring the point on screen.
    await handle.scrollIntoViewIfNeeded();
    const ivBefore = await segmentVolume('IV');
    const imageBefore = await pixels();
    const h = (await handle.boundingBox())!;
    // Screen left is the patient's right: the middle hepatic vein plane turns right, so IV gains.
    await page.mouse.move(h.x + h.width / 2, h.y + h.height / 2);
    await page.mouse.down();
    await page.mouse.move(h.x + h.width / 2 - 25, h.y + h.height / 2, { steps: 5 });
    await page.mouse.up();
    await expect.poll(() => page.getByTestId('landmark-status').textContent(), { timeout: 60_000 }).toMatch(/Segment map rebuilt after moving the middle hepatic vein/);
    await settled();
    const ivAfter = await segmentVolume('IV');
    expect(Number(ivAfter)).toBeGreaterThan(Number(ivBefore));
    await expect.poll(pixels).not.toBe(imageBefore);
    await page.screenshot({ path: 'test-results/viewer-landmark-moved.png', fullPage: true });
    expect(errors).toEqual([]);
  });

  it('moves to the next and previous visit with ] and [', async () => {
    await viewer().focus();
    await page.keyboard.press(']');
    await expect.poll(() => page.getByTestId('visit-title').textContent()).toBe('Visit v3 · 2026-05-04');
    await settled();
    await expect.poll(() => viewer().getAttribute('data-plane')).toBe('axial');
    // v3 has an imported map and no liver mask: landmarks are explained, not offered.
    expect(await page.getByTestId('landmark-panel').textContent()).toMatch(/no liver mask/);
    expect(await page.locator('[data-testid="lesion-row"]').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-lesion')))).toEqual(['M1', 'M2', 'M3']);
    await page.locator('[data-testid="lesion-row"][data-lesion="M1"]').click();
    await page.getByTestId('mark-editor').waitFor();
    await page.screenshot({ path: 'test-results/viewer-visit-v3-marks.png', fullPage: true });
    await page.keyboard.press('[');
    await expect.poll(() => page.getByTestId('visit-title').textContent()).toBe('Visit v2 · 2026-03-09');
    expect(errors).toEqual([]);
  });
});
