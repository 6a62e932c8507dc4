import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startWebServer, type WebServer } from '../../main/web-server.js';
import { patientFolder } from '../store/fixtures.js';
import { launchChromium, watchErrors } from './browser.js';

// A folder holding a DICOM series (written by pydicom from a NIfTI scan, names shuffled, a scout
// beside it) and the visit's segment map and lesion mask as NIfTI, imported through the app's folder
// picker in Chromium: the series list with the scan chosen, the header's patient ID and study date
// proposed and confirmed, then the scan seen in the viewer. Series choice rule: docs/formats.md.
// The same series compressed as JPEG-LS Lossless (GDCM's gdcmconv) is then imported as a later visit:
// the served app's CSP lets the bundled WebAssembly decoder compile and its .wasm asset load.
describe('DICOM import in the browser', () => {
  let server: WebServer;
  let browser: Browser;
  let page: Page;
  let errors: string[];
  let dir: string;

  beforeAll(async () => {
    if (!existsSync('build/renderer/index.html')) throw new Error('build the renderer first: npx vite build');
    mkdirSync('test-results', { recursive: true });
    dir = mkdtempSync(join(tmpdir(), 'falciform-dicom-e2e-'));
    const visit = join(dir, 'CD-export');
    mkdirSync(visit, { recursive: true });
    const v1 = patientFolder({ id: 'X', oneVisit: true }).filter((f) => f.relativePath.includes('/v1/'));
    for (const f of v1) writeFileSync(join(dir, f.relativePath.split('/').pop()!), f.bytes);
    const r = spawnSync('/usr/bin/python3', ['tests/reference/nifti_to_dicom.py', join(dir, 'scan.nii.gz'), join(visit, 'DICOM')], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(r.stderr);
    for (const name of ['segments.nii.gz', 'lesions.nii.gz']) writeFileSync(join(visit, name), v1.find((f) => f.relativePath.endsWith(name))!.bytes);
    const jls = join(dir, 'CD-export-jpeg-ls');
    mkdirSync(jls, { recursive: true });
    const c = spawnSync('/usr/bin/python3', ['tests/reference/nifti_to_dicom.py', join(dir, 'scan.nii.gz'), join(jls, 'DICOM'), 'jpegls'], { encoding: 'utf8' });
    if (c.status !== 0) throw new Error(c.stderr);
    for (const name of ['segments.nii.gz', 'lesions.nii.gz']) writeFileSync(join(jls, name), v1.find((f) => f.relativePath.endsWith(name))!.bytes);
    server = await startWebServer('build/renderer');
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    page = await context.newPage();
    errors = watchErrors(page);
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('imports a DICOM folder after the series, patient and date are confirmed, and shows the scan', async () => {
    await page.goto(server.url);
    await page.locator('[data-testid="patient-row"]').first().waitFor({ timeout: 90_000 }); // demo patients imported
    const input = page.getByTestId('folder-input');
    await expect.poll(() => input.getAttribute('webkitdirectory')).not.toBeNull();
    await input.setInputFiles(join(dir, 'CD-export'));
    const dialog = page.getByTestId('loose-dialog');
    await dialog.waitFor();
    const series = page.getByTestId('dicom-series');
    await series.waitFor();
    const labels = await series.locator('label').allTextContents();
    expect(labels).toHaveLength(2);
    expect(labels.find((l) => l.includes('Abdomen portal venous'))).toMatch(/40 slices, 64×48 \(the only volumetric series\)/);
    expect(labels.find((l) => l.includes('Scout'))).toMatch(/not a scan: a localizer/);
    expect(await series.locator('input:checked').count()).toBe(1);
    expect(await page.getByTestId('dicom-patient').textContent()).toContain('patient ID DCM-0007, Example Dicom, born 1960-01-01; study date 2026-05-20');
    // The headers propose the patient and date; the user confirms them.
    expect(await page.getByTestId('loose-patient').inputValue()).toBe('DCM-0007');
    expect(await page.getByTestId('loose-date').inputValue()).toBe('2026-05-20');
    // A patient not yet stored is made only when the user says so.
    await page.getByTestId('loose-create').check();
    await page.screenshot({ path: 'test-results/dicom-import-dialog.png' });
    await page.getByTestId('dialog-confirm').click();
    await page.getByTestId('import-done').waitFor({ timeout: 60_000 });
    expect(await page.locator('[data-patient="DCM-0007"] td').allTextContents().then((c) => c.slice(0, 2))).toEqual(['1', '2026-05-20']);

    await page.locator('[data-patient="DCM-0007"] [data-testid="open-patient"]').click();
    await page.locator('[data-testid="visit-row"] a').first().click();
    await page.getByTestId('slice-viewer').waitFor();
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 60_000 });
    await page.getByTestId('lesion-table').waitFor();
    expect(await page.getByTestId('dicom-facts').textContent()).toBe('Scan from DICOM: CT · Abdomen portal venous · 3 mm slices · 120 kVp · contrast IODINE · Phantom 1');
    // The same two lesions the NIfTI fixture's mask holds, placed on the DICOM-derived scan.
    expect(await page.locator('[data-testid="lesion-table"] tbody tr').count()).toBe(2);
    await page.screenshot({ path: 'test-results/dicom-import-visit.png' });
    expect(errors).toEqual([]);
  }, 180_000);

  it('imports the same series stored as JPEG-LS Lossless as a later visit of the stored patient', async () => {
    const wasm: string[] = [];
    page.on('response', (r) => { if (r.url().endsWith('.wasm')) wasm.push(`${r.status()} ${r.headers()['content-type']}`); });
    await page.goto(server.url);
    await page.locator('[data-patient="DCM-0007"]').waitFor();
    await page.getByTestId('folder-input').setInputFiles(join(dir, 'CD-export-jpeg-ls'));
    await page.getByTestId('dicom-series').waitFor();
    // The header's patient ID names a stored patient, which is chosen; the user gives the later date.
    expect(await page.getByTestId('loose-existing').inputValue()).toBe('DCM-0007');
    await page.getByTestId('loose-date').fill('2026-08-20');
    await page.getByTestId('dialog-confirm').click();
    await page.getByTestId('import-done').waitFor({ timeout: 60_000 });
    expect(wasm).toEqual(['200 application/wasm']);
    await page.locator('[data-patient="DCM-0007"] [data-testid="open-patient"]').click();
    await page.locator('[data-testid="visit-row"][data-visit="2026-08-20"] a').click();
    await page.getByTestId('slice-viewer').waitFor();
    await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 60_000 });
    await page.getByTestId('lesion-table').waitFor();
    expect(await page.getByTestId('dicom-facts').textContent()).toContain('Scan from DICOM: CT · Abdomen portal venous');
    expect(await page.locator('[data-testid="lesion-table"] tbody tr').count()).toBe(2);
    await page.screenshot({ path: 'test-results/dicom-import-jpeg-ls-visit.png' });
    expect(errors).toEqual([]);
  }, 180_000);
});
