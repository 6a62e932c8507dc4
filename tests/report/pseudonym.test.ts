import { createHmac } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { boardSheetHtml } from '../../src/report/board-html.js';
import { buildBoardSummary } from '../../src/report/board-summary.js';
import { caseFormCsv, caseFormRows } from '../../src/report/case-form.js';
import { keyedPseudonym, randomPseudonym } from '../../src/report/pseudonym.js';
import { syntheticPatient } from './fixtures.js';

describe('pseudonyms', () => {
  it('a keyed pseudonym is HMAC-SHA256 of the id under the key (RFC 4231 test case 2)', async () => {
    // RFC 4231 §4.3: key "Jefe", data "what do ya want for nothing?" →
    // HMAC-SHA-256 = 5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843.
    expect((await keyedPseudonym('what do ya want for nothing?', 'Jefe')).id).toBe('PS-5BDCC146BF60');
  });

  it('agrees with Node\'s own HMAC, and is stable for a key and different across keys', async () => {
    const a = await keyedPseudonym('DEMO-0001', 'trial 7 key');
    expect(a).toEqual({ id: `PS-${createHmac('sha256', 'trial 7 key').update('DEMO-0001').digest('hex').slice(0, 12).toUpperCase()}`, method: 'keyed' });
    expect((await keyedPseudonym('DEMO-0001', 'trial 7 key')).id).toBe(a.id);
    expect((await keyedPseudonym('DEMO-0001', 'another key')).id).not.toBe(a.id);
    expect((await keyedPseudonym('DEMO-0002', 'trial 7 key')).id).not.toBe(a.id);
  });

  it('a random pseudonym has the same form and differs each time', () => {
    const a = randomPseudonym(), b = randomPseudonym();
    expect(a.id).toMatch(/^PS-[0-9A-F]{12}$/);
    expect(a.method).toBe('random');
    expect(a.id).not.toBe(b.id);
  });

  it('a pseudonymised page and case form hold neither the id nor the identifying facts', async () => {
    const input = syntheticPatient({ visits: 3, lesions: 3, id: 'REAL-4711' });
    const plain = boardSheetHtml(buildBoardSummary(input, { madeAt: new Date(0) }));
    expect(plain).toContain('REAL-4711');
    expect(plain).toContain('Born 1950');

    const p = await keyedPseudonym('REAL-4711', 'k');
    const html = boardSheetHtml(buildBoardSummary(input, { madeAt: new Date(0), pseudonym: p }));
    // The id also sat in a warning's file name; it is replaced there too.
    expect(html).not.toContain('REAL-4711');
    expect(html).toContain(`${p.id}/v2/segments.nii.gz`);
    for (const fact of ['1950', '170 cm', '70 kg', 'female']) expect(html).not.toContain(fact);
    expect(html).toContain('keyed pseudonym (HMAC-SHA256');
    const csv = caseFormCsv(caseFormRows(input, p.id));
    expect(csv).not.toContain('REAL-4711');
    expect(csv.split('\r\n').slice(1, -1).every((line) => line.startsWith(`${p.id},`))).toBe(true);
  });
});
