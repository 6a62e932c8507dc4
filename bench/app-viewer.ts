// Benchmark: the app in Debian's Chromium (headless, through playwright-core) on the noisy CT-like
// 512×512×300 visit of bench/ct-visit.ts: its import through the folder picker (seconds, peak resident
// memory of the tab's renderer process), the time from opening the visit to its first slice drawn,
// and wheel scrolling with the segment wash and lesion outlines on (wheel event → slice drawn, and the
// interval between animation frames, median and 95th percentile). Prints figures; asserts nothing.
// Run: npx tsc -p tsconfig.node.json && npx vite build && node build/bench/app-viewer.js [--notches N]
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { importFolder, openApp, quantile, withPeakRss } from './app-browser.js';
import { coreLine, CT_VISIT, writeCtVisit } from './ct-visit.js';

const argv = process.argv.slice(2);
const notches = Number(argv[argv.indexOf('--notches') + 1]) || 200;
const dir = mkdtempSync(join(tmpdir(), 'falciform-bench-app-'));
const folder = join(dir, 'BENCH-0001');
mkdirSync(join(folder, 'v1'), { recursive: true });
const app = await openApp().catch((e: unknown) => {
  rmSync(dir, { recursive: true, force: true });
  throw e;
});
try {
  const written = await writeCtVisit(join(folder, 'v1'), CT_VISIT);
  writeFileSync(join(folder, 'manifest.json'), JSON.stringify({
    patient: { id: 'BENCH-0001', birthYear: 1960 },
    visits: [{ id: 'v1', date: '2026-01-12', scan: 'v1/scan.nii.gz', segments: 'v1/segments.nii.gz', lesions: 'v1/lesions.nii.gz' }],
  }));
  console.log(`${await coreLine()}; ${await app.page.evaluate<string>('navigator.userAgent.match(/Chrome\\/[\\d.]+/)[0]')}`);
  console.log(`visit ${CT_VISIT.dims.join('×')}: ${(written.gzBytes / 1e6).toFixed(1)} MB of .nii.gz for ${(written.rawBytes / 1e6).toFixed(1)} MB of voxels; ` +
    `gzip ratio of the scan ${written.scanRatio.toFixed(2)}:1`);

  const { page, profile } = app;
  const imported = await withPeakRss(profile, () => importFolder(page, folder, 'BENCH-0001'));
  console.log(`import through the app (files handed over → stored): ${imported.result.toFixed(2)} s; tab renderer peak resident ${imported.peakMb.toFixed(0)} MB`);

  // Opening the visit by its address, as a link in the app does; first slice = the viewer's image built
  // and the next animation frame reached.
  // (Page scripts are strings: this program is compiled without the DOM's types.)
  const firstSliceMs = await page.evaluate<number>(`new Promise((resolve) => {
    const t0 = performance.now();
    window.location.hash = '#/patient/BENCH-0001/visit/v1';
    const check = () => {
      if (document.querySelector('[data-testid="slice-viewer"][data-image]')) requestAnimationFrame(() => resolve(performance.now() - t0));
      else requestAnimationFrame(check);
    };
    check();
  })`);
  console.log(`first slice after opening the visit: ${(firstSliceMs / 1000).toFixed(2)} s (aim ≤ 1 s)`);
  await page.getByTestId('analysis-progress').waitFor({ state: 'detached', timeout: 300_000 });

  // Scroll: the wheel's notches at 60 a second over the image, overlays on. Event → drawn is the time
  // from the event's timestamp to the end of its handling (the viewer draws inside the event).
  const box = (await page.getByTestId('slice-viewer').boundingBox())!;
  await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
  await page.evaluate(`(() => {
    const rec = { drawnMs: [], frames: [], slices: [], running: true };
    window.benchWheel = rec;
    const viewer = document.querySelector('[data-testid="slice-viewer"]');
    window.addEventListener('wheel', (e) => {
      rec.drawnMs.push(performance.now() - e.timeStamp);
      rec.slices.push(Number(viewer.dataset.slice));
    });
    const frame = (t) => {
      rec.frames.push(t);
      if (rec.running) requestAnimationFrame(frame);
    };
    requestAnimationFrame(frame);
  })()`);
  const startSlice = Number(await page.getByTestId('slice-viewer').getAttribute('data-slice'));
  const t0 = performance.now();
  for (let n = 0; n < notches; n++) {
    // Half down, half back up, so the ends of the scan do not stop the count.
    await page.mouse.wheel(0, n < notches / 2 ? 100 : -100);
    const wait = t0 + ((n + 1) * 1000) / 60 - performance.now();
    if (wait > 0) await new Promise((r) => setTimeout(r, wait));
  }
  await new Promise((r) => setTimeout(r, 200));
  const rec = await page.evaluate<{ drawnMs: number[]; frames: number[]; slices: number[] }>('(window.benchWheel.running = false, window.benchWheel)');
  let advanced = 0;
  rec.slices.reduce((prev, s) => { advanced += Math.abs(s - prev); return s; }, startSlice);
  const gaps = rec.frames.slice(1).map((t, n) => t - rec.frames[n]);
  console.log(`scroll, wheel event → new slice drawn: median ${quantile(rec.drawnMs, 0.5).toFixed(1)} ms, p95 ${quantile(rec.drawnMs, 0.95).toFixed(1)} ms ` +
    `(${rec.drawnMs.length} events)`);
  console.log(`scroll, frame interval while scrolling: median ${quantile(gaps, 0.5).toFixed(1)} ms, p95 ${quantile(gaps, 0.95).toFixed(1)} ms (aim p95 ≤ 16 ms at 60 Hz)`);
  console.log(`slices advanced for ${notches} notches at 60/s: ${advanced}`);
} finally {
  await app.close();
  rmSync(dir, { recursive: true, force: true });
}
