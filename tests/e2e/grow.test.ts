import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { openBuiltApp, type OpenedApp } from './browser.js';

// Growing from a click in the visit viewer, in headless Chromium on an invented demo patient: a liver
// mask grown from one click, shown with its settings, accepted (stored with an edit-trail entry, the
// segment map rebuilt from the visit's landmarks inside it), then a lesion grown from a click on a
// lesion and accepted into the lesion mask. Screenshots go to test-results/.
describe('grow from a click', () => {
  let app: OpenedApp;
  let page: Page;
  let errors: string[];

  beforeAll(async () => {
    app = await openBuiltApp();
    ({ page, errors } = app);
  });

  afterAll(() => app?.close());

  const viewer = () => page.getByTestId('slice-viewer');
  const settled = async () => {
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 120_000 });
    await page.getByTestId('lesion-table').waitFor();
  };
  /** A screen point whose readout passes `want`, scanning a coarse grid over the image. */
  const pointWhere = async (want: (readout: string) => boolean): Promise<{ x: number; y: number; text: string }> => {
    await viewer().scrollIntoViewIfNeeded();
    const box = (await viewer().boundingBox())!;
    for (let fy = 0.25; fy <= 0.75; fy += 0.025) {
      for (let fx = 0.2; fx <= 0.8; fx += 0.025) {
        const x = box.x + box.width * fx, y = box.y + box.height * fy;
        await page.mouse.move(x, y);
        const text = (await page.getByTestId('readout').textContent()) ?? '';
        if (want(text)) return { x, y, text };
      }
    }
    throw new Error('no point of the image passes the test');
  };
  /** Of the grid points whose readout passes `want`, the one nearest their mean: well inside the region. */
  const middleWhere = async (want: (readout: string) => boolean): Promise<{ x: number; y: number }> => {
    await viewer().scrollIntoViewIfNeeded();
    const box = (await viewer().boundingBox())!;
    const hits: { x: number; y: number }[] = [];
    for (let fy = 0.2; fy <= 0.8; fy += 0.04) {
      for (let fx = 0.2; fx <= 0.8; fx += 0.04) {
        const x = box.x + box.width * fx, y = box.y + box.height * fy;
        await page.mouse.move(x, y);
        if (want((await page.getByTestId('readout').textContent()) ?? '')) hits.push({ x, y });
      }
    }
    if (hits.length === 0) throw new Error('no point of the image passes the test');
    const mx = hits.reduce((a, p) => a + p.x, 0) / hits.length, my = hits.reduce((a, p) => a + p.y, 0) / hits.length;
    return hits.reduce((best, p) => (Math.hypot(p.x - mx, p.y - my) < Math.hypot(best.x - mx, best.y - my) ? p : best));
  };

  it('grows the liver from one click, shows its settings, and stores it when accepted', async () => {
    await page.goto(app.url);
    await page.locator('[data-patient="DEMO-0001"] [data-testid="open-patient"]').click({ timeout: 90_000 });
    await page.locator('[data-testid="visit-row"][data-visit="v2"] a').click();
    await viewer().waitFor();
    await settled();
    const before = await page.locator('[data-testid="lesion-row"]').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-lesion')));
    const liverBefore = await page.getByTestId('liver-volume').textContent();

    // The tools open first: the point is looked for on the page as it will be clicked.
    await page.getByTestId('grow-open').click();
    await page.getByTestId('grow-opening').fill('5');
    await page.getByTestId('grow-liver').click();
    expect(await page.getByTestId('viewer-hint').textContent()).toMatch(/Click inside plain liver tissue/);
    const inLiver = await pointWhere((t) => /segment (V|VI|VII|VIII)\b/.test(t) && !/lesion /.test(t));
    await page.mouse.click(inLiver.x, inLiver.y);
    const result = page.getByTestId('grow-result');
    await result.waitFor({ timeout: 120_000 });
    const text = (await result.textContent()) ?? '';
    const ml = Number(/Liver (\d+) mL/.exec(text)?.[1]);
    // The demo liver (invented) is of adult size: between 800 and 3000 mL.
    expect(ml).toBeGreaterThan(800);
    expect(ml).toBeLessThan(3000);
    expect(text).toMatch(/Opening \/ closing5 mm \/ 4 mm/);
    await page.screenshot({ path: 'test-results/grow-liver-result.png' });

    await page.getByTestId('grow-accept').click();
    await expect.poll(async () => (await page.getByTestId('edit-notice').textContent()) ?? '', { timeout: 60_000 }).toMatch(/Liver mask of \d+ mL stored for visit v2/);
    // The analysis reruns on the grown liver: its volume changes from the imported mask's.
    await expect.poll(() => page.getByTestId('liver-volume').textContent(), { timeout: 120_000 }).not.toBe(liverBefore);
    await page.getByTestId('volumes-progress').waitFor({ state: 'detached', timeout: 120_000 });
    await settled();
    expect(Number(await page.getByTestId('liver-volume').textContent())).toBeCloseTo(ml, -1);
    expect(await page.getByTestId('map-source').textContent()).toMatch(/Built from this visit's landmarks/);
    // The lesions are still placed in segments of the map built inside the grown liver.
    const after = await page.locator('[data-testid="lesion-row"]').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-lesion')));
    expect(after).toEqual(before);
    const segments = await page.getByTestId('lesion-segment').allTextContents();
    expect(segments.every((s) => /^(I|II|III|IV|IVa|IVb|V|VI|VII|VIII)\b/.test(s))).toBe(true);
    await page.screenshot({ path: 'test-results/grow-liver-accepted.png' });

    // The edit trail names the grown liver.
    const trail = await page.evaluate(async () => {
      const open = indexedDB.open('falciform');
      const db: IDBDatabase = await new Promise((res, rej) => { open.onsuccess = () => res(open.result); open.onerror = () => rej(open.error); });
      const all: { field: string; entityId: string }[] = await new Promise((res) => {
        const req = db.transaction('audit').objectStore('audit').getAll();
        req.onsuccess = () => res(req.result as { field: string; entityId: string }[]);
      });
      return all.filter((a) => a.field === 'liver').map((a) => a.entityId);
    });
    expect(trail).toEqual(['v2']);
  });

  it('grows a lesion from a click on it and adds it to the lesion mask', async () => {
    await page.locator('[data-testid="lesion-row"][data-lesion="L1"]').click();
    await page.mouse.move(0, 0);
    await page.getByTestId('grow-lesion').click();
    const onLesion = await pointWhere((t) => /lesion L1\b/.test(t));
    const id = /lesion (L\d+)/.exec(onLesion.text)![1];
    await page.mouse.click(onLesion.x, onLesion.y);
    const result = page.getByTestId('grow-result');
    await result.waitFor({ timeout: 120_000 });
    const text = (await result.textContent()) ?? '';
    expect(text).toMatch(/Hypodense lesion, \d+\.\d\d mL: longest axial \d+\.\d mm, short axis \d+\.\d mm/);
    await page.screenshot({ path: 'test-results/grow-lesion-result.png' });
    await page.getByTestId('grow-accept').click();
    await expect.poll(async () => (await page.getByTestId('edit-notice').textContent()) ?? '', { timeout: 60_000 }).toMatch(/Lesion of \d+\.\d\d mL added/);
    await page.getByTestId('volumes-progress').waitFor({ state: 'detached', timeout: 120_000 });
    await settled();
    const row = page.locator(`[data-testid="lesion-row"][data-lesion="${id}"]`);
    expect(await row.count()).toBe(1);
    expect(await row.getByTestId('lesion-margin').textContent()).toMatch(/^\d+\.\d|^—|^0/);
    await page.screenshot({ path: 'test-results/grow-lesion-accepted.png' });
  });

  it('erases a ball from the liver mask with the brush on the coronal plane, and undoes it', async () => {
    await page.getByTestId('plane-coronal').click();
    const liverBefore = Number(await page.getByTestId('liver-volume').textContent());
    await page.getByTestId('brush-radius').fill('10');
    await page.getByTestId('brush-erase').click();
    // Deep inside the liver, so the whole 10 mm ball lies in the mask.
    const inLiver = await middleWhere((t) => /segment (V|VI|VII|VIII)\b/.test(t) && !/lesion /.test(t));
    await page.mouse.click(inLiver.x, inLiver.y);
    await expect.poll(async () => (await page.getByTestId('edit-notice').textContent()) ?? '', { timeout: 60_000 }).toMatch(/Brush: erased a 10 mm ball from the liver mask \(\d+ voxels\)/);
    await expect.poll(async () => Number(await page.getByTestId('liver-volume').textContent()), { timeout: 120_000 }).toBeLessThan(liverBefore);
    const erased = Number(await page.getByTestId('liver-volume').textContent());
    // A 10 mm ball is 4.19 mL (4/3·π·10³ mm³); on this coarse grid within 25%.
    expect(liverBefore - erased).toBeGreaterThan(4.19 * 0.75);
    expect(liverBefore - erased).toBeLessThan(4.19 * 1.25);
    await page.keyboard.press('Escape');
    await page.screenshot({ path: 'test-results/grow-brush-erased.png' });
    await page.getByTestId('mask-undo').click();
    await expect.poll(async () => Number(await page.getByTestId('liver-volume').textContent()), { timeout: 120_000 }).toBe(liverBefore);
    expect(await page.getByTestId('edit-notice').textContent()).toMatch(/^Undone: erased a 10 mm ball/);
    expect(errors).toEqual([]);
  });

  it('erases along a fast drag as one stroke: no gaps, one undo step', async () => {
    const liverBefore = Number(await page.getByTestId('liver-volume').textContent());
    await page.getByTestId('brush-radius').fill('5');
    await page.getByTestId('brush-erase').click();
    const inLiver = await middleWhere((t) => /segment (V|VI|VII|VIII)\b/.test(t) && !/lesion /.test(t));
    // A fast drag: two pointer moves 30 px apart, far more than a 5 mm ball on screen.
    await page.mouse.move(inLiver.x - 30, inLiver.y);
    await page.mouse.down();
    await page.mouse.move(inLiver.x, inLiver.y, { steps: 1 });
    await page.mouse.move(inLiver.x + 30, inLiver.y, { steps: 1 });
    await page.mouse.up();
    await expect.poll(async () => (await page.getByTestId('edit-notice').textContent()) ?? '', { timeout: 60_000 }).toMatch(/Brush: erased a stroke of \d+ 5 mm balls from the liver mask/);
    await expect.poll(async () => Number(await page.getByTestId('liver-volume').textContent()), { timeout: 120_000 }).toBeLessThan(liverBefore);
    const erased = liverBefore - Number(await page.getByTestId('liver-volume').textContent());
    // More than one 5 mm ball (0.52 mL, 4/3·π·5³ mm³): the stroke's length is painted, not just its ends.
    expect(erased).toBeGreaterThan(3 * 0.52);
    await page.keyboard.press('Escape');
    await page.screenshot({ path: 'test-results/grow-brush-stroke.png' });
    await page.getByTestId('mask-undo').click();
    await expect.poll(async () => Number(await page.getByTestId('liver-volume').textContent()), { timeout: 120_000 }).toBe(liverBefore);
    expect(await page.getByTestId('edit-notice').textContent()).toMatch(/^Undone: erased a stroke/);
    expect(errors).toEqual([]);
  });
});
