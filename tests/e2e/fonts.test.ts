import type { ChildProcess } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { SHIPPED_FONTS } from '../../src/report/fonts.js';
import { launchChromium, startServedApp, watchErrors } from './browser.js';

// The app draws its text in the fonts it ships, and its About screen carries each font's licence.
describe('shipped fonts in the app', () => {
  let app: ChildProcess;
  let url: string;
  let browser: Browser;

  beforeAll(async () => {
    ({ app, url } = await startServedApp(mkdtempSync(join(tmpdir(), 'falciform-fonts-'))));
    browser = await launchChromium();
  });

  afterAll(async () => {
    await browser?.close();
    if (app && app.exitCode === null) app.kill('SIGKILL');
  });

  it('loads the shipped families from the bundle and uses them for text', async () => {
    const page = await browser.newPage();
    const errors = watchErrors(page);
    await page.goto(`${url}#/about`);
    await page.getByTestId('about').waitFor();
    const fonts = await page.evaluate(async (families) => {
      // A font is fetched when text needs it: open the licence texts, which are set in the mono face.
      document.querySelectorAll('details').forEach((d) => { d.open = true; });
      await new Promise((r) => requestAnimationFrame(r));
      await document.fonts.ready;
      const loaded = [...document.fonts].filter((f) => f.status === 'loaded').map((f) => f.family.replace(/["']/g, ''));
      return {
        loaded: families.filter((f) => loaded.includes(f)),
        body: getComputedStyle(document.body).fontFamily,
        licenceMono: getComputedStyle(document.querySelector('.about-font pre')!).fontFamily,
      };
    }, SHIPPED_FONTS.map((f) => f.family));
    expect(fonts.loaded).toEqual(SHIPPED_FONTS.map((f) => f.family));
    expect(fonts.body).toBe('"Atkinson Hyperlegible Next", sans-serif');
    expect(fonts.licenceMono).toBe('"Atkinson Hyperlegible Mono", monospace');
    expect(errors).toEqual([]);
  });

  it('the About screen shows each font with its licence text, and the licence sits beside the font files', async () => {
    const page = await browser.newPage();
    await page.goto(url);
    await page.getByRole('link', { name: 'About' }).click();
    const notices = page.getByTestId('font-licence');
    await expect(notices.count()).resolves.toBe(SHIPPED_FONTS.length);
    for (let i = 0; i < SHIPPED_FONTS.length; i++) {
      await notices.nth(i).locator('summary').click();
      const text = await notices.nth(i).textContent();
      expect(text).toContain(SHIPPED_FONTS[i].family);
      expect(text).toContain('OFL-1.1');
      expect(text).toContain('This Font Software is licensed under the SIL Open Font License, Version 1.1.');
    }
    await page.screenshot({ path: 'test-results/about.png', fullPage: true });
    for (const font of SHIPPED_FONTS) {
      const res = await fetch(`${url}assets/${font.pkg.split('/')[1]}-LICENSE.txt`);
      expect(res.status).toBe(200);
      expect(await res.text()).toContain('SIL OPEN FONT LICENSE Version 1.1');
    }
  });
});
