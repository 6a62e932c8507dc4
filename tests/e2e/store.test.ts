import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { patientFolder, writeFiles } from '../store/fixtures.js';
import { launchChromium, watchErrors } from './browser.js';

// The local store in Chromium's real IndexedDB: import a patient folder through the folder picker,
// reload, find it again; a bad folder names its file and changes nothing.
describe('local store in the browser', () => {
  let server: WebServer;
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  let errors: string[];
  let dir: string;

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
    dir = mkdtempSync(join(tmpdir(), 'falciform-store-'));
    writeFiles(join(dir, 'good'), patientFolder({ id: 'DEMO-0101' }));
    const bad = patientFolder({ id: 'BAD-0001', oneVisit: true }).map((f) =>
      f.relativePath.endsWith('scan.nii.gz') ? { ...f, bytes: f.bytes.slice(0, f.bytes.length >> 1) } : f,
    );
    writeFiles(join(dir, 'bad'), bad);
    const loose = patientFolder({ id: 'X', oneVisit: true }).filter((f) => f.relativePath.includes('/v1/'));
    writeFiles(join(dir, 'loose'), loose.map((f) => ({ ...f, relativePath: f.relativePath.replace('X/v1/', '') })));
    server = await startWebServer('build/renderer');
    browser = await launchChromium();
    // One profile for the whole test, so the store outlives a reload as it does for a user.
    context = await browser.newContext();
    page = await context.newPage();
    errors = watchErrors(page);
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  const rows = () => page.getByTestId('patient-row');
  const folderInput = async () => {
    const input = page.getByTestId('folder-input');
    await expect.poll(() => input.getAttribute('webkitdirectory')).not.toBeNull();
    return input;
  };

  it('imports a patient folder, and the patient is still there after a reload', async () => {
    await page.goto(server.url);
    // A fresh store gets the demo patients first; removing them leaves the store empty for this test.
    await page.getByTestId('remove-demo').click({ timeout: 60_000 });
    await page.getByTestId('remove-demo-dialog').getByRole('button', { name: 'Remove demo patients' }).click();
    await page.getByTestId('no-patients').waitFor();
    await page.reload();
    await page.getByTestId('no-patients').waitFor(); // not offered again
    await (await folderInput()).setInputFiles(join(dir, 'good', 'DEMO-0101'));
    await page.getByTestId('import-done').waitFor();
    expect(await page.getByTestId('import-done').textContent()).toMatch(/Imported DEMO-0101: 2 visits imported/);
    await expect.poll(() => rows().count()).toBe(1);

    await page.reload();
    await page.locator('[data-patient="DEMO-0101"]').waitFor();
    const cells = await page.locator('[data-patient="DEMO-0101"] td').allTextContents();
    expect(cells.slice(0, 3)).toEqual(['2', '2026-01-12 – 2026-03-02', '1958']);
    mkdirSync('test-results', { recursive: true });
    await page.screenshot({ path: 'test-results/patient-list.png', fullPage: true });
  });

  it('a folder with a damaged scan names the file and leaves the list as it was', async () => {
    await (await folderInput()).setInputFiles(join(dir, 'bad', 'BAD-0001'));
    await page.getByTestId('import-error').waitFor();
    expect(await page.getByTestId('error-file').textContent()).toBe('BAD-0001/v1/scan.nii.gz');
    expect(await page.getByTestId('error-problem').textContent()).toMatch(/truncated|corrupt/);
    await page.screenshot({ path: 'test-results/import-error.png', fullPage: true });
    await page.reload();
    await page.locator('[data-patient="DEMO-0101"]').waitFor();
    expect(await rows().count()).toBe(1);
  });

  it('deleting asks first; a backup made before brings the patient back', async () => {
    const download = page.waitForEvent('download');
    await page.getByTestId('backup-one').click();
    const file = join(dir, (await download).suggestedFilename());
    await (await download).saveAs(file);
    expect(file).toMatch(/falciform-backup-DEMO-0101-\d{4}-\d{2}-\d{2}\.falciform$/);
    const before = await page.locator('[data-patient="DEMO-0101"] td').allTextContents();

    await page.getByTestId('delete-patient').click();
    const dialog = page.getByTestId('delete-dialog');
    await dialog.waitFor();
    expect(await dialog.textContent()).toMatch(/Delete patient DEMO-0101\?.*removes 2 visits/s);
    await page.screenshot({ path: 'test-results/delete-dialog.png' });
    await page.getByTestId('dialog-cancel').click();
    await dialog.waitFor({ state: 'detached' });
    expect(await rows().count()).toBe(1);

    await page.getByTestId('delete-patient').click();
    await page.getByTestId('dialog-confirm').click();
    await page.getByTestId('no-patients').waitFor();
    await page.reload();
    await page.getByTestId('no-patients').waitFor();

    await page.getByTestId('restore-input').setInputFiles(file);
    await page.getByTestId('import-done').waitFor();
    expect(await page.getByTestId('import-done').textContent()).toBe('Restored 1 patient.');
    await page.reload();
    await page.locator('[data-patient="DEMO-0101"]').waitFor();
    expect(await page.locator('[data-patient="DEMO-0101"] td').allTextContents()).toEqual(before);
    expect(errors).toEqual([]);
  });

  it('loose files ask whose visit they are, then import as one visit', async () => {
    await page.getByTestId('files-input').setInputFiles(['scan.nii.gz', 'segments.nii.gz', 'lesions.nii.gz'].map((f) => join(dir, 'loose', f)));
    const dialog = page.getByTestId('loose-dialog');
    await dialog.waitFor();
    expect(await dialog.locator('dd').allTextContents()).toEqual(['scan.nii.gz', 'segments.nii.gz', 'lesions.nii.gz']);
    await page.getByTestId('loose-patient').fill('LOOSE-0001');
    await page.getByTestId('loose-date').fill('2026-04-10');
    // A new patient is made only when asked for.
    await page.getByTestId('loose-create').check();
    await page.screenshot({ path: 'test-results/loose-files-dialog.png' });
    await page.getByTestId('dialog-confirm').click();
    await page.getByTestId('import-done').waitFor();
    const cells = await page.locator('[data-patient="LOOSE-0001"] td').allTextContents();
    expect(cells.slice(0, 2)).toEqual(['1', '2026-04-10']);
    expect(errors).toEqual([]);
  });
});
