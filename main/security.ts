import type { BrowserWindowConstructorOptions } from 'electron';

/** The app's own origin: the renderer is served from a privileged custom scheme, never file:// or http. */
export const APP_SCHEME = 'falciform';
export const APP_ORIGIN = `${APP_SCHEME}://app`;

/**
 * Content-Security-Policy for every page the app serves (Electron protocol and the local web server).
 * Nothing from a remote origin: scripts, styles, workers and fetches come from the app itself;
 * blob: and data: are needed for decoded images and generated downloads. 'wasm-unsafe-eval' lets the
 * app compile WebAssembly (the JPEG-LS and JPEG 2000 decoders, bundled files of the app) and nothing
 * else: JavaScript eval and new Function stay refused.
 */
export const CONTENT_SECURITY_POLICY = [
  "default-src 'none'",
  "script-src 'self' 'wasm-unsafe-eval'",
  "style-src 'self'",
  "img-src 'self' data: blob:",
  "font-src 'self'",
  "connect-src 'self' blob: data:",
  "worker-src 'self' blob:",
  "manifest-src 'self'",
  "object-src 'none'",
  "base-uri 'none'",
  "form-action 'none'",
  "frame-src 'none'",
  "frame-ancestors 'none'",
].join('; ');

/** The one window's options: isolated, sandboxed renderer without Node. */
export function windowOptions(preloadPath: string, devTools: boolean): BrowserWindowConstructorOptions {
  return {
    width: 1440,
    height: 920,
    minWidth: 1024,
    minHeight: 700,
    show: false,
    title: 'Falciform',
    backgroundColor: '#f7f7f5',
    autoHideMenuBar: true,
    webPreferences: {
      preload: preloadPath,
      contextIsolation: true,
      sandbox: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      nodeIntegrationInSubFrames: false,
      webSecurity: true,
      allowRunningInsecureContent: false,
      webviewTag: false,
      navigateOnDragDrop: false,
      spellcheck: false,
      safeDialogs: true,
      devTools,
    },
  };
}

/** True only for pages of the app itself; everything else is refused navigation. */
export function isAppUrl(url: string): boolean {
  try {
    const u = new URL(url);
    return u.protocol === `${APP_SCHEME}:` && u.host === 'app';
  } catch {
    return false;
  }
}

/** Requests the renderer may make: its own origin and in-memory data. Everything else is cancelled. */
export function isAllowedRequest(url: string): boolean {
  return isAppUrl(url) || url.startsWith('data:') || url.startsWith('blob:') || url.startsWith('devtools:');
}
