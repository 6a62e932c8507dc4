import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { findBrowser, printToPdf } from '../../src/cli/print-pdf.js';
import { buildBoardSummary } from '../../src/report/board-summary.js';
import { boardDocument } from '../../src/report/board-html.js';
import type { PageSize } from '../../src/report/board-style.js';
import { keyedPseudonym } from '../../src/report/pseudonym.js';
import { syntheticPatient } from './fixtures.js';
import { pdfInfo } from './pdf.js';

// The page at its limits (11 visits, 16 lesion tracks, alerts, warnings, a remnant line, a pseudonym note) still prints on one sheet of
// either paper size; the page count and size are read back with pdfinfo (Debian's poppler-utils).
// Paper sizes: ISO 216 A4 is 210 × 297 mm = 595 × 842 pt; US Letter is 8.5 × 11 in = 612 × 792 pt.
const dir = mkdtempSync(join(tmpdir(), 'falciform-page-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const EXPECTED: Record<PageSize, [number, number]> = { A4: [595, 842], Letter: [612, 792] };

describe('board summary page fit', () => {
  const browser = findBrowser({});
  it('finds Debian\'s Chromium, and FALCIFORM_BROWSER overrides the search', () => {
    expect(browser).toBe('/usr/bin/chromium');
    expect(findBrowser({ FALCIFORM_BROWSER: 'none' })).toBeNull();
    expect(findBrowser({ FALCIFORM_BROWSER: '/no/such/browser' })).toBeNull();
    expect(findBrowser({ FALCIFORM_BROWSER: '/usr/bin/chromium' })).toBe('/usr/bin/chromium');
  });

  for (const page of ['A4', 'Letter'] as const) {
    it(`a crowded patient still fits one ${page} page`, async () => {
      const input = syntheticPatient({ visits: 11, lesions: 16, oddTreatment: true, remnant: true });
      const html = join(dir, `crowded-${page}.html`);
      const pseudonym = await keyedPseudonym('SYN-0001', 'trial key');
      writeFileSync(html, boardDocument(buildBoardSummary(input, { madeAt: new Date(Date.UTC(2026, 11, 1, 9, 30)), pseudonym }), page));
      const pdf = join(dir, `crowded-${page}.pdf`);
      await printToPdf(browser!, html, pdf);
      const info = pdfInfo(pdf);
      mkdirSync('test-results', { recursive: true });
      spawnSync('pdftoppm', ['-png', '-r', '60', '-singlefile', pdf, `test-results/board-crowded-${page}`]);
      expect(info.pages).toBe(1);
      expect(info.widthPt).toBeCloseTo(EXPECTED[page][0], -0.5);
      expect(info.heightPt).toBeCloseTo(EXPECTED[page][1], -0.5);
    });
  }
});
