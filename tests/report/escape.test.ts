import { describe, expect, it } from 'vitest';
import { embeddedFontCss } from '../../src/cli/fonts.js';
import { boardDocument, boardSheetHtml } from '../../src/report/board-html.js';
import { buildBoardSummary } from '../../src/report/board-summary.js';
import { esc } from '../../src/report/html-escape.js';
import { syntheticPatient } from './fixtures.js';

// The board summary is shown in the app through innerHTML, so no value from the data may become
// markup. The five characters are those the HTML standard gives meaning to in text and attributes.
const HOSTILE = `<img src=x onerror="alert(1)">'&"</p><script>alert(2)</script>`;

/** Tags the page may hold: its own layout and the SVG charts (with groups and their tooltips), nothing that runs or loads. */
const ALLOWED = new Set([
  'article', 'header', 'footer', 'section', 'div', 'p', 'h1', 'h2', 'span', 'b', 'br', 'ul', 'li',
  'table', 'thead', 'tbody', 'tr', 'th', 'td', 'svg', 'g', 'title', 'line', 'polyline', 'path', 'circle', 'rect', 'ellipse', 'text',
]);

describe('HTML escaping', () => {
  it('escapes the five special characters', () => {
    expect(esc(`<a href="x">Tom & 'Jerry'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;Tom &amp; &#39;Jerry&#39;&lt;/a&gt;');
    expect(esc(42)).toBe('42');
  });

  it('a hostile treatment label, warning and patient id stay text', () => {
    const input = syntheticPatient({ visits: 3, lesions: 3 });
    input.manifest.treatments = [{ date: input.manifest.visits[0].date, kind: 'other', label: HOSTILE }];
    input.manifest.patient.id = HOSTILE;
    const visits = [{ ...input.visits[0], warnings: [HOSTILE] }, ...input.visits.slice(1)];
    const html = boardSheetHtml(buildBoardSummary({ ...input, visits }, { madeAt: new Date(0) }));
    const tags = new Set([...html.matchAll(/<([a-zA-Z][a-zA-Z0-9]*)/g)].map((m) => m[1].toLowerCase()));
    expect([...tags].filter((t) => !ALLOWED.has(t))).toEqual([]);
    const openTags = [...html.matchAll(/<[a-zA-Z][^>]*>/g)].map((m) => m[0]);
    expect(openTags.filter((t) => /\son[a-z]+\s*=/i.test(t))).toEqual([]);
    expect(openTags.filter((t) => /\sstyle\s*=/i.test(t))).toEqual([]); // the app's CSP refuses style attributes
    expect(html).toContain('&lt;img src=x onerror=&quot;alert(1)&quot;&gt;&#39;&amp;&quot;&lt;/p&gt;&lt;script&gt;');
  });

  it('the printed file has no scripts and loads nothing: its fonts are inlined', () => {
    const doc = boardDocument(buildBoardSummary(syntheticPatient({ visits: 2, lesions: 2 }), { madeAt: new Date(0) }), 'A4', embeddedFontCss());
    // The only URLs are the shipped fonts, inlined as data.
    const fonts = /url\(data:font\/woff2;base64,[A-Za-z0-9+/=]+\)/g;
    expect(doc.match(fonts)?.length).toBe(10);
    expect(doc.replace(fonts, '')).not.toMatch(/<script|<link|<iframe|<img|\ssrc=|\shref=|url\(/i);
    expect(doc).toContain("default-src 'none'");
    expect(doc).toMatch(/@page \{ size: A4 portrait;/);
  });
});
