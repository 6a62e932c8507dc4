import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { findBrowser, printToPdf } from '../../src/cli/print-pdf.js';
import { buildBoardSummary } from '../../src/report/board-summary.js';
import { embeddedFontCss } from '../../src/cli/fonts.js';
import { boardDocument, boardSheetPlan } from '../../src/report/board-html.js';
import { SHEET_MM, type PageSize } from '../../src/report/board-style.js';
import type { BoardSummary } from '../../src/report/board-summary.js';
import { chromium } from 'playwright-core';
import { keyedPseudonym } from '../../src/report/pseudonym.js';
import { syntheticPatient } from './fixtures.js';
import { pdfInfo, pdfWords } from './pdf.js';

// The page at its limits (11 visits, 24 lesion tracks, alerts, warnings, a remnant line, a pseudonym note) prints on exactly the
// sheets its plan announces, on either paper size, the first sheet saying that more follow; a typical patient takes one sheet.
// The page count and size are read back with pdfinfo (Debian's poppler-utils), the layout measured in Chromium.
// Paper sizes: ISO 216 A4 is 210 × 297 mm = 595 × 842 pt; US Letter is 8.5 × 11 in = 612 × 792 pt.
const dir = mkdtempSync(join(tmpdir(), 'falciform-page-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const EXPECTED: Record<PageSize, [number, number]> = { A4: [595, 842], Letter: [612, 792] };

/**
 * Two machines' font settings: this machine's fontconfig as it is, and one that offers a single font,
 * DejaVu Sans Mono (Debian's fonts-dejavu-core), wider than any proportional face, with the system's rendering rules (/etc/fonts/conf.d: hinting, antialiasing) kept so that
 * only the fonts on offer differ. The page embeds its own fonts, so neither may change it.
 */
const FONT_SETTINGS = [
  { name: 'machine-fonts', env: () => process.env },
  { name: 'one-fallback-font', env: oneFontEnv },
];

function oneFontEnv(): NodeJS.ProcessEnv {
  const folder = join(dir, 'one-font');
  const conf = join(dir, 'one-font.conf');
  if (!existsSync(conf)) {
    mkdirSync(folder);
    symlinkSync('/usr/share/fonts/truetype/dejavu/DejaVuSansMono.ttf', join(folder, 'DejaVuSansMono.ttf'));
    writeFileSync(conf, `<?xml version="1.0"?>\n<!DOCTYPE fontconfig SYSTEM "fonts.dtd">\n<fontconfig><dir>${folder}</dir><include ignore_missing="yes">/etc/fonts/conf.d</include><cachedir>${join(dir, 'fc-cache')}</cachedir></fontconfig>\n`);
  }
  return { ...process.env, FONTCONFIG_FILE: conf };
}

/** The crowded patient: 11 visits, 24 lesion tracks, alerts, warnings, a remnant line, a pseudonym note. */
async function crowdedSummary(): Promise<BoardSummary> {
  const input = syntheticPatient({ visits: 11, lesions: 24, oddTreatment: true, remnant: true });
  const pseudonym = await keyedPseudonym('SYN-0001', 'trial key');
  return buildBoardSummary(input, { madeAt: new Date(Date.UTC(2026, 11, 1, 9, 30)), pseudonym });
}

async function crowdedPage(page: PageSize): Promise<string> {
  const html = join(dir, `crowded-${page}.html`);
  writeFileSync(html, boardDocument(await crowdedSummary(), page, embeddedFontCss()));
  return html;
}

/** Every sheet's height and every table row's height (mm), and any table wider than its sheet, as Chromium lays the page out. */
async function measuredLayout(html: string, env: NodeJS.ProcessEnv) {
  const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--headless', '--no-sandbox', '--disable-gpu'], env: env as Record<string, string> });
  try {
    // The sheet's width: the A4 printable width, as the page's @page rule gives it in print.
    const page = await browser.newPage({ viewport: { width: Math.round((SHEET_MM.width / 25.4) * 96), height: 1200 } });
    await page.goto(pathToFileURL(html).href);
    await page.evaluate(() => document.fonts.ready);
    return await page.evaluate(() => {
      const mm = (px: number) => (px * 25.4) / 96;
      const sheets = [...document.querySelectorAll('.board-sheet')];
      return {
        sheetsMm: sheets.map((x) => mm(x.getBoundingClientRect().height)),
        rowsMm: [...document.querySelectorAll('.board-sheet tr')].map((x) => mm(x.getBoundingClientRect().height)),
        tooWide: [...document.querySelectorAll('.board-sheet table')]
          .filter((t) => t.getBoundingClientRect().width > t.parentElement!.clientWidth + 1)
          .map((t) => `${t.parentElement!.getAttribute('data-section')}: ${mm(t.getBoundingClientRect().width).toFixed(1)} mm`),
        continues: sheets.map((x) => x.querySelector('[data-testid="board-continues"]')?.textContent ?? null),
      };
    });
  } finally {
    await browser.close();
  }
}

/** pdffonts' table: each font's name and whether it is embedded. */
function pdfFonts(pdf: string): { name: string; type: string; embedded: boolean }[] {
  const out = spawnSync('pdffonts', [pdf], { encoding: 'utf8' }).stdout.split('\n').slice(2).filter((l) => l.trim());
  // Columns: name type encoding emb sub uni object ID; the type may hold a space ("CID TrueType").
  return out.map((l) => {
    const cols = l.trim().split(/\s+/);
    return { name: cols[0], type: cols.slice(1, -6).join(' '), embedded: cols[cols.length - 5] === 'yes' };
  });
}

/** A headless Chromium screenshot of the page at A4 width, 96 dpi, under the given environment. */
function screenshot(html: string, png: string, env: NodeJS.ProcessEnv): Buffer {
  const profile = mkdtempSync(join(dir, 'profile-'));
  const r = spawnSync('/usr/bin/chromium', [
    '--headless', '--no-sandbox', '--disable-gpu', '--hide-scrollbars', '--force-device-scale-factor=1', '--window-size=794,1123',
    `--user-data-dir=${profile}`, `--screenshot=${resolve(png)}`, pathToFileURL(html).href,
  ], { env, encoding: 'utf8', timeout: 90_000 });
  if (r.status !== 0) throw new Error(`chromium --screenshot failed: ${r.stderr}`);
  return readFileSync(png);
}

describe('board summary page fit', () => {
  const browser = findBrowser({});
  it('finds Debian\'s Chromium, and FALCIFORM_BROWSER overrides the search', () => {
    expect(browser).toBe('/usr/bin/chromium');
    expect(findBrowser({ FALCIFORM_BROWSER: 'none' })).toBeNull();
    expect(findBrowser({ FALCIFORM_BROWSER: '/no/such/browser' })).toBeNull();
    expect(findBrowser({ FALCIFORM_BROWSER: '/usr/bin/chromium' })).toBe('/usr/bin/chromium');
  });

  it('plans the crowded patient on two sheets and a typical one on one', async () => {
    const plan = boardSheetPlan(await crowdedSummary());
    expect(plan).toHaveLength(2);
    // Every row of every section is on some sheet, once.
    const rowsOf = (id: string) => plan.flatMap((x) => x.parts.filter((p) => p.section === id).map((p) => p.to - p.from)).reduce((a, b) => a + b, 0);
    expect(rowsOf('visits')).toBe(11);
    expect(rowsOf('tracks')).toBe(24);
    // The lesion table runs over: its rows continue on the second sheet under the repeated header.
    expect(plan[1].parts[0]).toMatchObject({ section: 'tracks', continued: true });
    const typical = buildBoardSummary(syntheticPatient({ visits: 4, lesions: 5 }), { madeAt: new Date(Date.UTC(2026, 11, 1, 9, 30)) });
    expect(boardSheetPlan(typical)).toHaveLength(1);
  });

  for (const fonts of FONT_SETTINGS) {
    it(`lays every sheet out at its planned height, rows at their set height (${fonts.name})`, { timeout: 120_000 }, async () => {
      const plan = boardSheetPlan(await crowdedSummary());
      const m = await measuredLayout(await crowdedPage('A4'), fonts.env());
      expect(m.sheetsMm).toHaveLength(plan.length);
      // A sheet taller than its set height would have spilled: the plan counted less than was drawn.
      for (const h of m.sheetsMm) expect(h).toBeCloseTo(SHEET_MM.height, 1);
      expect(m.rowsMm.length).toBeGreaterThan(40);
      for (const h of m.rowsMm) expect(h).toBeCloseTo(SHEET_MM.row, 2);
      expect(m.tooWide).toEqual([]);
      expect(m.continues[0]).toMatch(/^Continued on sheet 2 of 2: /);
      expect(m.continues[1]).toBeNull();
    });
  }

  for (const page of ['A4', 'Letter'] as const) {
    for (const fonts of FONT_SETTINGS) {
      it(`a crowded patient prints on exactly the announced sheets of ${page} (${fonts.name})`, { timeout: 180_000 }, async () => {
        const announced = boardSheetPlan(await crowdedSummary()).length;
        const pdf = join(dir, `crowded-${page}-${fonts.name}.pdf`);
        await printToPdf(browser!, await crowdedPage(page), pdf, undefined, fonts.env());
        const info = pdfInfo(pdf);
        mkdirSync('test-results', { recursive: true });
        spawnSync('pdftoppm', ['-png', '-r', '60', pdf, `test-results/board-crowded-${page}-${fonts.name}`]);
        expect(info.pages).toBe(announced);
        const words = pdfWords(pdf);
        expect(words).toContain(`Continued on sheet 2 of ${announced}`);
        expect(words).toContain(`sheet ${announced} of ${announced}`);
        expect(words).toContain('(continued)');
        expect(info.widthPt).toBeCloseTo(EXPECTED[page][0], -0.5);
        expect(info.heightPt).toBeCloseTo(EXPECTED[page][1], -0.5);
        // Every font in the PDF is embedded and is one the project ships (pdffonts, poppler-utils).
        // Chromium writes text drawn with an outline (the diagram's label halo) as a Type 3 font of
        // glyph outlines, which has no name; the pixel comparisons below show it is the same font.
        const fontsUsed = pdfFonts(pdf);
        const named = fontsUsed.filter((f) => f.type !== 'Type 3').map((f) => f.name.replace(/^[A-Z]{6}\+/, ''));
        expect(named).toContain('AtkinsonHyperlegibleNext-Regular');
        expect(named).toContain('AtkinsonHyperlegibleNext-Bold');
        expect(named.filter((n) => !/^AtkinsonHyperlegible(Next|Mono)/.test(n))).toEqual([]);
        expect(fontsUsed.every((f) => f.embedded)).toBe(true);
      });
    }
  }

  it('the printed page is the same pixel for pixel under both font settings', () => {
    for (const page of ['A4', 'Letter'] as const) {
      for (const sheet of [1, 2]) {
        const [a, b] = FONT_SETTINGS.map((fonts) => readFileSync(`test-results/board-crowded-${page}-${fonts.name}-${sheet}.png`));
        expect(a.length).toBeGreaterThan(10_000);
        expect(b.equals(a)).toBe(true);
      }
    }
  });

  it('the page on screen is the same pixel for pixel under both font settings', { timeout: 240_000 }, async () => {
    const html = await crowdedPage('A4');
    const shots = FONT_SETTINGS.map((fonts) => screenshot(html, `test-results/board-crowded-screen-${fonts.name}.png`, fonts.env()));
    expect(shots[0].length).toBeGreaterThan(10_000);
    expect(shots[1].equals(shots[0])).toBe(true);
  });
});
