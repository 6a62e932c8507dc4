import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdtemp, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

/**
 * Printing an HTML file to PDF with an installed Chromium or Chrome, headless. The page's own @page
 * rule sets the paper size. A throwaway profile keeps the user's browser profile untouched, and a
 * time limit keeps a browser that hangs from hanging the command.
 */

const CANDIDATES = [
  '/usr/bin/chromium', '/usr/bin/chromium-browser', '/usr/bin/google-chrome', '/usr/bin/google-chrome-stable',
  '/snap/bin/chromium',
  '/Applications/Chromium.app/Contents/MacOS/Chromium',
  '/Applications/Google Chrome.app/Contents/MacOS/Google Chrome',
  join(process.env['PROGRAMFILES'] ?? 'C:\\Program Files', 'Google', 'Chrome', 'Application', 'chrome.exe'),
  join(process.env['PROGRAMFILES(X86)'] ?? 'C:\\Program Files (x86)', 'Google', 'Chrome', 'Application', 'chrome.exe'),
];

/** FALCIFORM_BROWSER names the browser ("none" for no PDF); else the first usual install found. */
export function findBrowser(env: NodeJS.ProcessEnv = process.env): string | null {
  const chosen = env.FALCIFORM_BROWSER;
  if (chosen) return chosen === 'none' || !existsSync(chosen) ? null : chosen;
  return CANDIDATES.find((p) => existsSync(p)) ?? null;
}

/** Why findBrowser gave none, in words for the user. */
export function noBrowserReason(env: NodeJS.ProcessEnv = process.env): string {
  const chosen = env.FALCIFORM_BROWSER;
  if (chosen === 'none') return 'skipped at the user\'s request (FALCIFORM_BROWSER=none)';
  if (chosen) return `FALCIFORM_BROWSER names ${chosen}, which does not exist`;
  return 'no Chromium or Chrome found (set FALCIFORM_BROWSER to one)';
}

export const PRINT_TIMEOUT_MS = 90_000;

/**
 * Prints htmlFile to pdfFile; rejects with the reason in words when no PDF came out. `env` is the
 * browser's environment (a test gives it another font configuration).
 */
export async function printToPdf(browser: string, htmlFile: string, pdfFile: string, timeoutMs = PRINT_TIMEOUT_MS, env: NodeJS.ProcessEnv = process.env): Promise<void> {
  const profile = await mkdtemp(join(tmpdir(), 'falciform-print-'));
  const args = [
    '--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-extensions',
    '--no-first-run', '--no-default-browser-check', '--no-pdf-header-footer', `--user-data-dir=${profile}`,
    `--print-to-pdf=${resolve(pdfFile)}`, pathToFileURL(resolve(htmlFile)).href,
  ];
  try {
    await new Promise<void>((done, fail) => {
      const child = spawn(browser, args, { stdio: ['ignore', 'ignore', 'pipe'], env });
      let err = '';
      child.stderr.on('data', (c: Buffer) => { if (err.length < 4000) err += c.toString(); });
      const timer = setTimeout(() => {
        child.kill('SIGKILL');
        fail(new Error(`${browser} did not finish within ${timeoutMs / 1000} s`));
      }, timeoutMs);
      child.on('error', (e) => { clearTimeout(timer); fail(e); });
      child.on('exit', (code) => {
        clearTimeout(timer);
        if (code === 0) done();
        else fail(new Error(`${browser} exited with code ${code}${err ? `: ${err.trim().split('\n').slice(-1)[0]}` : ''}`));
      });
    });
    const info = await stat(pdfFile).catch(() => null);
    if (!info || info.size === 0) throw new Error(`${browser} wrote no PDF`);
  } finally {
    await rm(profile, { recursive: true, force: true }).catch(() => undefined);
  }
}
