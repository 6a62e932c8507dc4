import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync } from 'node:fs';
import { chromium, type Browser, type Page } from 'playwright-core';
import { startWebServer } from '../../main/web-server.js';

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

/**
 * `npm start` in browser mode (after the build), serving only: the process and the address it prints.
 * `dataDir` is the app's own data folder (its browser profile and port file).
 */
export async function startServedApp(dataDir: string): Promise<{ app: ChildProcess; url: string }> {
  const app = spawn(process.execPath, ['scripts/start.mjs'], {
    env: { ...process.env, FALCIFORM_BROWSER: 'none', FALCIFORM_DATA_DIR: dataDir },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  const url = await new Promise<string>((resolve, reject) => {
    let out = '';
    app.stdout!.on('data', (chunk) => {
      out += chunk;
      const m = out.match(/served at (http:\/\/127\.0\.0\.1:\d+\/)/);
      if (m) resolve(m[1]);
    });
    app.on('exit', (code) => reject(new Error(`start exited early with ${code}: ${out}`)));
  });
  return { app, url };
}

/** The built app served on loopback and one Chromium page at a desktop size, for a viewer-screen test. */
export interface OpenedApp { url: string; page: Page; errors: string[]; close: () => Promise<void> }

export async function openBuiltApp(): Promise<OpenedApp> {
  if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
  mkdirSync('test-results', { recursive: true });
  const server = await startWebServer('build/renderer');
  const browser = await launchChromium();
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
  const page = await context.newPage();
  return { url: server.url, page, errors: watchErrors(page), close: async () => { await browser.close(); await server.close(); } };
}
