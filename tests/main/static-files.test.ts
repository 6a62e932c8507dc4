import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, mkdirSync, symlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { openRegularFile, resolveStaticPath } from '../../main/static-files.js';
import { startWebServer } from '../../main/web-server.js';
import { readChosenFiles, writeFileAtomic } from '../../main/file-access.js';
import { VERSION } from '../../src/version.js';

describe('static file paths', () => {
  const root = '/srv/app';
  it('maps the root to index.html and assets below the root', () => {
    expect(resolveStaticPath(root, '/')).toBe('/srv/app/index.html');
    expect(resolveStaticPath(root, '/assets/index.js?x=1')).toBe('/srv/app/assets/index.js');
  });
  it('refuses paths that leave the root', () => {
    for (const p of ['/../etc/passwd', '/%2e%2e/%2e%2e/etc/passwd', '/assets/..%2f..%2fsecret', '/a%00b', '/%E0%A4%A', '/..\\x']) {
      expect(resolveStaticPath(root, p)).toBeNull();
    }
  });
});

describe('file access', () => {
  it('reads a chosen folder without hidden files and refuses past the size limit', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'falciform-folder-'));
    mkdirSync(join(dir, 'v1'));
    writeFileSync(join(dir, 'manifest.json'), '{}');
    writeFileSync(join(dir, 'v1', 'scan.nii.gz'), new Uint8Array(100));
    writeFileSync(join(dir, '.DS_Store'), 'x');
    const files = await readChosenFiles([dir], true, 1000);
    expect(files.map((f) => f.relativePath).sort()).toEqual(['manifest.json', 'v1/scan.nii.gz']);
    await expect(readChosenFiles([dir], true, 50)).rejects.toThrow(/exceed/);
  });

  it('writes atomically', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'falciform-save-'));
    await writeFileAtomic(join(dir, 'out.csv'), new TextEncoder().encode('a,b\n'));
    expect(readFileSync(join(dir, 'out.csv'), 'utf8')).toBe('a,b\n');
  });
});

describe('version', () => {
  it('equals package.json', () => {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8'));
    expect(VERSION).toBe(pkg.version);
  });
});

describe('the served app serves only regular files', () => {
  it('answers a FIFO, a device and a link to a device in its folder with 404 at once, and a file as itself', async () => {
    const root = mkdtempSync(join(tmpdir(), 'falciform-serve-'));
    writeFileSync(join(root, 'index.html'), '<!doctype html><title>x</title>');
    execFileSync('mkfifo', [join(root, 'pipe.js')]);
    symlinkSync('/dev/zero', join(root, 'zero.js'));
    symlinkSync('/dev/urandom', join(root, 'random.json'));
    const server = await startWebServer(root);
    try {
      for (const name of ['pipe.js', 'zero.js', 'random.json']) {
        const started = performance.now();
        const res = await fetch(`${server.url}${name}`, { signal: AbortSignal.timeout(5000) });
        expect(res.status, name).toBe(404);
        expect(performance.now() - started, name).toBeLessThan(1000);
      }
      const head = await fetch(`${server.url}zero.js`, { method: 'HEAD', signal: AbortSignal.timeout(5000) });
      expect(head.status).toBe(404);
      const page = await fetch(server.url, { signal: AbortSignal.timeout(5000) });
      expect(page.status).toBe(200);
      expect(await page.text()).toBe('<!doctype html><title>x</title>');
    } finally {
      await server.close();
    }
    // The same check the desktop window's app protocol uses.
    expect(await openRegularFile(join(root, 'pipe.js'))).toBeNull();
    expect(await openRegularFile('/dev/zero')).toBeNull();
    expect(await openRegularFile(join(root, 'missing.js'))).toBeNull();
    const index = await openRegularFile(join(root, 'index.html'));
    expect(index?.size).toBe(31);
    await index?.handle.close();
  });
});
