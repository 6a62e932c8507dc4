import { constants } from 'node:fs';
import { open, type FileHandle } from 'node:fs/promises';
import { extname, join, normalize, sep } from 'node:path';

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.woff2': 'font/woff2',
  '.gz': 'application/gzip',
  '.wasm': 'application/wasm',
};

export function contentType(path: string): string {
  return TYPES[extname(path).toLowerCase()] ?? 'application/octet-stream';
}

/**
 * Maps a request path ("/", "/assets/x.js", "/demo/…") to a file under root, or null when it would
 * leave root (encoded "..", absolute paths, NUL bytes) or is malformed. "/" is index.html.
 */
export function resolveStaticPath(root: string, urlPath: string): string | null {
  let decoded: string;
  try {
    decoded = decodeURIComponent(urlPath.split('?')[0].split('#')[0]);
  } catch {
    return null;
  }
  if (decoded.includes('\0') || decoded.includes('\\')) return null;
  const relative = decoded === '/' || decoded === '' ? 'index.html' : decoded.replace(/^\/+/, '');
  const full = normalize(join(root, relative));
  const base = normalize(root.endsWith(sep) ? root : root + sep);
  return full.startsWith(base) ? full : null;
}

/**
 * Opens a file to serve only if the opened file itself is a regular file: a FIFO, a device, or a link
 * to one placed in the app's folder is refused at once (null) instead of blocking a read for ever.
 * O_NONBLOCK keeps the open itself from waiting for a FIFO's writer; the check is on the open handle,
 * so nothing can be swapped in between the check and the read. The caller closes the handle.
 */
export async function openRegularFile(path: string): Promise<{ handle: FileHandle; size: number } | null> {
  let handle: FileHandle;
  try {
    handle = await open(path, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0));
  } catch {
    return null;
  }
  const info = await handle.stat().catch(() => null);
  if (!info?.isFile()) {
    await handle.close();
    return null;
  }
  return { handle, size: info.size };
}
