import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { openBuiltApp, type OpenedApp } from './browser.js';

// Scrolling the viewer with the wheel while the pointer rests on the image: the readout (position,
// value, segment) follows the slice without a mouse move, notches the browser merged into one event
// all count, and the new slice is drawn inside the wheel event itself, not a frame later.
describe('viewer wheel scrolling', () => {
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
  const readout = async () => (await page.getByTestId('readout').textContent()) ?? '';
  /** The z of the readout's RAS position, in mm. */
  const readoutZ = async () => Number(/z (-?\d+\.\d) mm/.exec(await readout())?.[1]);

  it('keeps the readout on the slice under a still pointer, counts merged notches, draws in the event', async () => {
    await page.goto(app.url);
    await page.locator('[data-patient="DEMO-0001"] [data-testid="open-patient"]').click({ timeout: 90_000 });
    await page.locator('[data-testid="visit-row"][data-visit="v2"] a').click();
    await viewer().waitFor();
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 60_000 });

    const box = (await viewer().boundingBox())!;
    const x = box.x + box.width * 0.45, y = box.y + box.height * 0.5;
    await page.mouse.move(x, y);
    await expect.poll(readout).toMatch(/mm \(RAS\)/);
    const first = await sliceNumber();
    const z0 = await readoutZ();

    // One notch down, pointer still: the readout must already be that of the new slice, the same as
    // what a pointer arriving at this point afresh would read.
    await page.mouse.wheel(0, 100);
    await expect.poll(sliceNumber).not.toBe(first);
    const afterWheel = await readout();
    expect(await readoutZ()).not.toBe(z0);
    await page.mouse.move(x + 40, y + 40);
    await page.mouse.move(x, y);
    expect(await readout()).toBe(afterWheel);

    // Three notches merged into one event move three slices.
    const one = await sliceNumber();
    const step = one - first;
    expect(Math.abs(step)).toBe(1);
    await page.mouse.wheel(0, 300);
    await expect.poll(sliceNumber).toBe(one + 3 * step);

    // The wheel event itself renders and draws: right after dispatch, in the same task, the slice
    // attribute and the canvas already show the next slice.
    const drawn = await page.evaluate(() => {
      const el = document.querySelector('[data-testid="slice-viewer"]') as HTMLElement;
      const canvas = document.querySelector('[data-testid="slice-canvas"]') as HTMLCanvasElement;
      const r = el.getBoundingClientRect();
      const before = { slice: el.dataset.slice, pixels: canvas.toDataURL() };
      el.dispatchEvent(new WheelEvent('wheel', { deltaY: 100, clientX: r.left + r.width / 2, clientY: r.top + r.height / 2, bubbles: true, cancelable: true }));
      return { before, after: { slice: el.dataset.slice, pixels: canvas.toDataURL() } };
    });
    expect(Number(drawn.after.slice)).toBe(Number(drawn.before.slice) + step);
    expect(drawn.after.pixels).not.toBe(drawn.before.pixels);
    await page.screenshot({ path: 'test-results/viewer-wheel-readout.png' });
    expect(errors).toEqual([]);
  });
});
