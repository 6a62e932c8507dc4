import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CHANNELS, openFilesRequest, parseRequest, printToPdfRequest, saveFileRequest } from '../../main/bridge-api.js';

describe('desktop bridge validation', () => {
  it('accepts well-formed calls and fills defaults', () => {
    expect(parseRequest(openFilesRequest, {})).toEqual({ folder: false, multiple: true });
    expect(parseRequest(openFilesRequest, { folder: true, filters: [{ name: 'NIfTI', extensions: ['nii', 'gz'] }] }).folder).toBe(true);
    const bytes = new Uint8Array([1, 2, 3]);
    expect(parseRequest(saveFileRequest, { suggestedName: 'case-form.csv', bytes }).bytes).toBe(bytes);
    expect(parseRequest(printToPdfRequest, { suggestedName: 'board.pdf', pageSize: 'Letter' }).pageSize).toBe('Letter');
  });

  it('refuses names that point into folders or carry control characters', () => {
    for (const suggestedName of ['../../.bashrc', '/etc/passwd', 'a\\b.csv', 'x\u0000.csv', '']) {
      expect(() => parseRequest(saveFileRequest, { suggestedName, bytes: new Uint8Array(1) })).toThrow(/refused: suggestedName/);
    }
  });

  it('refuses wrong types, unknown fields and non-PDF print targets', () => {
    expect(() => parseRequest(saveFileRequest, { suggestedName: 'a.csv', bytes: 'text' })).toThrow(/refused: bytes/);
    expect(() => parseRequest(openFilesRequest, { folder: true, path: '/etc' })).toThrow(/refused/);
    expect(() => parseRequest(openFilesRequest, { filters: [{ name: 'x', extensions: ['*/../..'] }] })).toThrow(/refused: filters/);
    expect(() => parseRequest(printToPdfRequest, { suggestedName: 'board.html', pageSize: 'A4' })).toThrow(/refused: suggestedName/);
    expect(() => parseRequest(printToPdfRequest, { suggestedName: 'board.pdf', pageSize: 'A3' })).toThrow(/refused: pageSize/);
    expect(() => parseRequest(printToPdfRequest, null)).toThrow(/refused/);
  });

  it('preload exposes exactly the channels the main process handles', () => {
    const preload = readFileSync(new URL('../../main/preload.cts', import.meta.url), 'utf8');
    const used = [...preload.matchAll(/invoke\('([^']+)'/g)].map((m) => m[1]).sort();
    expect(used).toEqual(Object.values(CHANNELS).sort());
  });
});
