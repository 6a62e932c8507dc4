import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { CONTENT_SECURITY_POLICY } from './security.js';
import { contentType, openRegularFile, resolveStaticPath } from './static-files.js';

export interface WebServer {
  url: string;
  port: number;
  close(): Promise<void>;
}

/**
 * Serves the built renderer on 127.0.0.1 only, for the browser-window mode of `npm start` and for
 * the end-to-end tests. Same CSP as the desktop window; GET and HEAD only; requests addressed to
 * any other host name are refused (a web page elsewhere cannot reach it through DNS rebinding).
 * Only regular files are served: a FIFO or device in the folder answers 404 at once.
 */
export async function startWebServer(root: string, port = 0): Promise<WebServer> {
  const server: Server = createServer(async (req, res) => {
    const host = req.headers.host ?? '';
    const { port: actual } = server.address() as AddressInfo;
    if (host !== `127.0.0.1:${actual}` && host !== `localhost:${actual}`) {
      res.writeHead(421).end();
      return;
    }
    if (req.method !== 'GET' && req.method !== 'HEAD') {
      res.writeHead(405, { allow: 'GET, HEAD' }).end();
      return;
    }
    const path = resolveStaticPath(root, req.url ?? '/');
    const file = path ? await openRegularFile(path) : null;
    if (!path || !file) {
      res.writeHead(404, { 'content-type': 'text/plain' }).end('not found');
      return;
    }
    res.writeHead(200, {
      'content-type': contentType(path),
      'content-length': file.size,
      'content-security-policy': CONTENT_SECURITY_POLICY,
      'x-content-type-options': 'nosniff',
      'referrer-policy': 'no-referrer',
      'cross-origin-opener-policy': 'same-origin',
      // Built assets carry a content hash in their names: cache them for good, so workers started
      // later (a patient opened with the network cut) load from the cache. Everything else revalidates.
      'cache-control': /\/assets\/[^/]+-[A-Za-z0-9_-]{8}\.\w+$/.test(path) ? 'public, max-age=31536000, immutable' : 'no-cache',
    });
    if (req.method === 'HEAD') {
      await file.handle.close();
      res.end();
    } else {
      file.handle.createReadStream().pipe(res);
    }
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const { port: bound } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${bound}/`,
    port: bound,
    close: () => new Promise<void>((resolve) => {
      server.closeAllConnections();
      server.close(() => resolve());
    }),
  };
}
