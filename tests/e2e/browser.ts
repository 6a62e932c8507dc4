import { chromium, type Browser, type Page } from 'playwright-core';

/** Debian's Chromium, headless, never a downloaded browser. */
export const CHROMIUM = process.env.FALCIFORM_TEST_CHROMIUM ?? '/usr/bin/chromium';

export function launchChromium(): Promise<Browser> {
  return chromium.launch({
    executablePath: CHROMIUM,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking'],
  });
}

/** Collects console errors and page errors (CSP violations show up here) for a test to assert on. */
export function watchErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
  page.on('pageerror', (e) => errors.push(e.message));
  return errors;
}
