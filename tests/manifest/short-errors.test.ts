import { describe, expect, it } from 'vitest';
import { isFalciformError, oneLine } from '../../src/errors.js';
import { parseJsonFile } from '../../src/json-file.js';
import { parseManifest } from '../../src/manifest/manifest.js';
import { parseLandmarks } from '../../src/segments/landmarks.js';

const manifest = {
  patient: { id: 'P-1' },
  visits: [{ id: 'v1', date: '2026-01-12', scan: 's.nii.gz', segments: 'g.nii.gz', lesions: 'l.nii.gz' }],
};

describe('files that start with a UTF-8 byte-order mark', () => {
  it('are read like the same file without one (RFC 8259 §8.1 lets parsers ignore it)', () => {
    const text = JSON.stringify(manifest);
    expect(parseManifest(`\uFEFF${text}`, 'm.json')).toEqual(parseManifest(text, 'm.json'));
    expect(parseJsonFile('\uFEFF{"a": 1}', 'x.json')).toEqual({ a: 1 });
  });
});

describe('error lines', () => {
  it('escape control characters and keep one line', () => {
    expect(oneLine('a.json: bad "x\ny\u001b[31m"')).toBe('a.json: bad "x\\ny\\u001b[31m"');
  });

  it('leave out the middle of a long message, keeping the file name at the start', () => {
    const line = oneLine(`big.json: ${'z'.repeat(100_000)} end`);
    expect(line.length).toBeLessThan(500);
    expect(line.startsWith('big.json: zzz')).toBe(true);
    expect(line.endsWith('z end')).toBe(true);
    expect(line).toMatch(/characters left out/);
  });

  it('quote at most about 200 characters of a wrong value from a file', () => {
    const huge = 'A'.repeat(50_000);
    let err: unknown;
    try {
      parseLandmarks(JSON.stringify({ space: huge, units: 'mm', points: {} }), 'lm.json');
    } catch (e) {
      err = e;
    }
    expect(isFalciformError(err)).toBe(true);
    expect((err as Error).message.length).toBeLessThan(400);
  });
});
