// What the app benchmarks share: the built app served locally, Debian's Chromium driven through
// playwright-core with a profile of our own (so its processes can be found), a folder import, and the
// peak resident memory of the tab's renderer process (its workers included) while something runs.
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../main/web-server.js';

export interface App {
  page: Page;
  context: BrowserContext;
  server: WebServer;
  profile: string;
  close(): Promise<void>;
}

/** Serves build/renderer, opens it in headless Chromium and waits for the demo patients' first import. */
export async function openApp(): Promise<App> {
  if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
  const server = await startWebServer('build/renderer');
  const profile = mkdtempSync(join(tmpdir(), 'falciform-bench-profile-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.FALCIFORM_TEST_CHROMIUM ?? '/usr/bin/chromium',
    headless: true,
    viewport: { width: 1440, height: 900 },
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking'],
  });
  const page = context.pages()[0] ?? (await context.newPage());
  await page.goto(server.url);
  await page.locator('[data-patient="DEMO-0003"]').waitFor({ timeout: 180_000 });
  return {
    page, context, server, profile,
    async close() {
      await context.close();
      await server.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Resident MB of each Chromium renderer process started with this profile. */
function rendererRssMb(profile: string): number[] {
  const out: number[] = [];
  for (const pid of readdirSync('/proc').filter((p) => /^\d+$/.test(p))) {
    try {
      const cmd = readFileSync(`/proc/${pid}/cmdline`, 'utf8');
      if (!cmd.includes(profile) || !cmd.includes('--type=renderer')) continue;
      const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
      if (m) out.push(Number(m[1]) / 1024);
    } catch {
      // The process ended while we looked.
    }
  }
  return out;
}

/** Runs `f` while sampling the largest renderer process's resident memory every 50 ms. */
export async function withPeakRss<T>(profile: string, f: () => Promise<T>): Promise<{ result: T; peakMb: number }> {
  let peakMb = 0;
  const sample = () => { for (const mb of rendererRssMb(profile)) peakMb = Math.max(peakMb, mb); };
  const timer = setInterval(sample, 50);
  try {
    const result = await f();
    sample();
    return { result, peakMb };
  } finally {
    clearInterval(timer);
  }
}

/** Imports a patient folder (manifest.json and its files) through the app's folder picker; seconds. */
export async function importFolder(page: Page, folder: string, patientId: string): Promise<number> {
  const input = page.getByTestId('folder-input');
  await input.waitFor({ state: 'attached' });
  const t0 = performance.now();
  await input.setInputFiles(folder);
  const done = page.getByTestId('import-done').filter({ hasText: patientId });
  const failed = page.getByTestId('import-error');
  await done.or(failed).first().waitFor({ timeout: 900_000 });
  const s = (performance.now() - t0) / 1000;
  if (await failed.count()) throw new Error(`import of ${folder} failed: ${await failed.first().textContent()}`);
  return s;
}

export function quantile(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))];
}
