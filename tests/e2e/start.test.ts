import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, mkdtempSync } from 'node:fs';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { launchChromium, startServedApp, watchErrors } from './browser.js';

// `npm start` without the Electron binary: the served app, opened here in headless Chromium.
describe('npm start, browser mode', () => {
  let app: ChildProcess;
  let url: string;
  let browser: Browser;

  beforeAll(async () => {
    const data = mkdtempSync(join(tmpdir(), 'falciform-start-'));
    mkdirSync(data, { recursive: true });
    ({ app, url } = await startServedApp(data));
    browser = await launchChromium();
  });

  afterAll(async () => {
    await browser?.close();
    if (app && app.exitCode === null) app.kill('SIGKILL');
  });

  it('serves on loopback only, with the CSP header', async () => {
    expect(url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
    const res = await fetch(url);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-security-policy')).toContain("default-src 'none'");
    // fetch() may not set Host; a raw request can, as a rebinding page's browser would.
    const status = await new Promise<number | undefined>((resolve, reject) => {
      request(url, { headers: { host: 'evil.example' } }, (r) => { r.resume(); resolve(r.statusCode); })
        .on('error', reject)
        .end();
    });
    expect(status).toBe(421);
  });

  it('shows the first screen with the caution and no errors', async () => {
    const page = await browser.newPage();
    const errors = watchErrors(page);
    await page.goto(url);
    await expect(page.getByRole('heading', { name: 'Falciform' }).textContent()).resolves.toBe('Falciform');
    await expect(page.getByTestId('caution').textContent()).resolves.toMatch(/not a medical device/);
    await page.screenshot({ path: 'test-results/first-screen.png' });
    expect(errors).toEqual([]);
  });

  it('ends cleanly on Ctrl-C', async () => {
    const exited = new Promise<number | null>((resolve) => app.on('exit', (code) => resolve(code)));
    app.kill('SIGINT');
    await expect(exited).resolves.toBe(0);
  });
});

// A fresh machine without Electron's binary and without a browser: two plain lines tell the user why
// and where the app is.
describe('npm start without Electron and without a browser', () => {
  it('says Electron is not installed, serves the app and names the address to open', async () => {
    const data = mkdtempSync(join(tmpdir(), 'falciform-start-'));
    const app = spawn(process.execPath, ['scripts/start.mjs'], {
      env: { ...process.env, FALCIFORM_BROWSER: 'none', FALCIFORM_DATA_DIR: data },
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    const out = await new Promise<string>((resolve, reject) => {
      let text = '';
      app.stdout.on('data', (chunk) => {
        text += chunk;
        if (/Ctrl-C to stop\.\n/.test(text)) resolve(text);
      });
      app.on('exit', (code) => reject(new Error(`start exited early with ${code}: ${text}`)));
    });
    const exited = new Promise<number | null>((resolve) => app.on('exit', (code) => resolve(code)));
    app.kill('SIGINT');
    await expect(exited).resolves.toBe(0);
    const lines = out.trim().split('\n');
    expect(lines[0]).toMatch(/^Electron is not installed \((it needs Node 22\.12 or later|its binary could not be downloaded).*\): the app opens in a browser window instead\.$/);
    const url = /served at (http:\/\/127\.0\.0\.1:\d+\/)/.exec(out)?.[1];
    expect(url).toBeDefined();
    expect(lines.at(-1)).toBe(`No browser window: skipped at the user's request (FALCIFORM_BROWSER=none). Open ${url} in any browser. Ctrl-C to stop.`);
  });
});
