// No network: the served app (`npm start` without Electron) is loaded in headless Chromium while every
// request it makes is recorded; none may leave its own origin (http://127.0.0.1:PORT/) other than
// in-memory data: and blob: URLs. Requests elsewhere are aborted so nothing leaves the machine even
// if one appears, and Content-Security-Policy violations are collected too, because a request the
// CSP blocks never reaches the network log. Then the network is cut and the app must keep working.
import type { ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { launchChromium, startServedApp, watchErrors } from './browser.js';

interface Recorder {
  /** Every request the pages, workers and service workers of the context made. */
  requests: string[];
  /** Requests outside the app's origin (aborted), and web sockets opened. */
  outside: string[];
  failed: string[];
  page: Page;
  errors: string[];
  violations(): Promise<string[]>;
}

/** Buttons whose action leaves the page for the operating system or destroys data; not clicked. */
const SKIP = /delete|remove|erase|print|save|export|download|import|open|choose|folder|file/i;

describe('no network: the served app', () => {
  let app: ChildProcess;
  let url: string;
  let browser: Browser;
  let data: string;

  const ownOrigin = (u: string) => u.startsWith(url) || u.startsWith('data:') || u.startsWith(`blob:${url.slice(0, -1)}`);

  async function record(context: BrowserContext): Promise<Recorder> {
    const requests: string[] = [];
    const outside: string[] = [];
    const failed: string[] = [];
    context.on('request', (r) => requests.push(r.url()));
    // A request the page itself cancelled (a worker ended as its screen closed) is not a failure to reach anything.
    context.on('requestfailed', (r) => {
      if (r.failure()?.errorText !== 'net::ERR_ABORTED') failed.push(`${r.url()} (${r.failure()?.errorText ?? '?'})`);
    });
    await context.route('**/*', async (route) => {
      const u = route.request().url();
      if (ownOrigin(u)) return route.continue();
      outside.push(u);
      return route.abort('blockedbyclient');
    });
    // Collected by the page itself: the CSP stops such a load before any request exists.
    await context.addInitScript(() => {
      const seen: string[] = [];
      (window as unknown as { __violations: string[] }).__violations = seen;
      document.addEventListener('securitypolicyviolation', (e) => seen.push(`${e.violatedDirective} ${e.blockedURI}`));
    });
    const page = await context.newPage();
    page.on('websocket', (ws) => outside.push(ws.url()));
    const errors = watchErrors(page);
    // Only blocked loads matter here. A refused eval ("script-src eval") is no request: zod, for one,
    // probes with new Function whether it may compile its parsers, and falls back when refused.
    const violations = async () =>
      (await page.evaluate(() => (window as unknown as { __violations?: string[] }).__violations ?? []))
        .filter((v) => !/ (eval|inline|wasm-eval|trusted-types-eval)$/.test(v));
    return { requests, outside, failed, page, errors, violations };
  }

  /**
   * Goes through what the app offers now: every in-app link and every button that stays inside the
   * app (a demo patient list, a patient, its tabs), one click each, back to the start after each.
   * Grows with the app without changes here.
   */
  async function explore(page: Page): Promise<string[]> {
    const visited: string[] = [];
    const targets = page.locator('a[href], button:not([disabled]), [role="tab"], [role="link"]');
    const count = Math.min(await targets.count(), 40);
    for (let n = 0; n < count; n++) {
      const target = targets.nth(n);
      if (!(await target.isVisible().catch(() => false))) continue;
      const name = ((await target.getAttribute('aria-label').catch(() => null)) ?? (await target.textContent().catch(() => '')) ?? '').trim();
      const href = await target.getAttribute('href').catch(() => null);
      if (SKIP.test(name) || (href && !href.startsWith('#') && !ownOrigin(new URL(href, url).href))) continue;
      await target.click({ timeout: 2000 }).catch(() => undefined);
      await page.waitForLoadState('networkidle').catch(() => undefined);
      visited.push(name || href || `#${n}`);
      if (!page.url().startsWith(url)) await page.goto(url, { waitUntil: 'networkidle' });
    }
    return visited;
  }

  beforeAll(async () => {
    data = mkdtempSync(join(tmpdir(), 'falciform-offline-'));
    ({ app, url } = await startServedApp(data));
    browser = await launchChromium();
  });

  afterAll(async () => {
    await browser?.close();
    if (app && app.exitCode === null) app.kill('SIGKILL');
    rmSync(data, { recursive: true, force: true });
  });

  it('makes every request to its own origin while loading and while being used', async () => {
    const context = await browser.newContext();
    const r = await record(context);
    await r.page.goto(url, { waitUntil: 'networkidle' });
    await expect(r.page.getByRole('heading', { name: 'Falciform' }).textContent()).resolves.toBe('Falciform');
    await expect(r.page.getByTestId('caution').textContent()).resolves.toMatch(/not a medical device/);
    await explore(r.page);
    await r.page.waitForLoadState('networkidle');

    // The page, its script and style at least.
    expect(r.requests.length).toBeGreaterThanOrEqual(3);
    expect(r.requests.some((u) => /\/assets\/.+\.js$/.test(u))).toBe(true);
    expect(r.requests.filter((u) => !ownOrigin(u))).toEqual([]);
    expect(r.outside).toEqual([]);
    expect(await r.violations()).toEqual([]);
    expect(r.failed).toEqual([]);
    expect(r.errors).toEqual([]);
    await context.close();
  });

  it('keeps working with the network cut after it has loaded', async () => {
    const context = await browser.newContext();
    const r = await record(context);
    await r.page.goto(url, { waitUntil: 'networkidle' });
    // Use the app once online (a patient, a visit) so every script it has, workers included, is loaded.
    await r.page.getByTestId('open-patient').first().click({ timeout: 60_000 });
    await r.page.getByTestId('visit-table').waitFor({ timeout: 60_000 });
    await r.page.locator('[data-testid=visit-row] a').first().click();
    await r.page.getByTestId('lesion-table').waitFor({ timeout: 60_000 });
    await r.page.goto(`${url}#/`, { waitUntil: 'networkidle' });
    const before = r.requests.length;
    await context.setOffline(true);
    expect(await r.page.evaluate(() => navigator.onLine)).toBe(false);

    await explore(r.page);
    // Still rendered and responsive: the frame, the caution, and React still answering events.
    await expect(r.page.getByRole('heading', { name: 'Falciform', exact: true }).isVisible()).resolves.toBe(true);
    await expect(r.page.getByTestId('caution').textContent()).resolves.toMatch(/not a medical device/);
    expect(await r.page.evaluate(() => document.getElementById('root')!.childElementCount)).toBeGreaterThan(0);
    // Local storage of patients (IndexedDB) needs no network either.
    const stored = await r.page.evaluate(
      () => new Promise<boolean>((resolve) => {
        const req = indexedDB.open('falciform-offline-probe');
        req.onsuccess = () => { req.result.close(); resolve(true); };
        req.onerror = () => resolve(false);
      }),
    );
    expect(stored).toBe(true);
    await r.page.screenshot({ path: 'test-results/offline.png' });

    // Nothing the app did offline needed a request that then failed.
    expect(r.failed).toEqual([]);
    expect(r.requests.slice(before).filter((u) => !ownOrigin(u))).toEqual([]);
    expect(r.outside).toEqual([]);
    expect(await r.violations()).toEqual([]);
    expect(r.errors).toEqual([]);
    await context.close();
  });
});
