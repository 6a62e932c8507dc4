import { describe, expect, it } from 'vitest';
import { CONTENT_SECURITY_POLICY, isAllowedRequest, isAppUrl, windowOptions } from '../../main/security.js';

// Source for the expected settings: Electron's security checklist (electronjs.org/docs/latest/tutorial/security),
// from memory: context isolation, sandbox, no Node integration, web security on, no webview, a CSP.
describe('window options', () => {
  const options = windowOptions('/app/build/main/preload.cjs', false);
  const web = options.webPreferences!;

  it('isolates and sandboxes the renderer without Node', () => {
    expect(web.contextIsolation).toBe(true);
    expect(web.sandbox).toBe(true);
    expect(web.nodeIntegration).toBe(false);
    expect(web.nodeIntegrationInWorker).toBe(false);
    expect(web.nodeIntegrationInSubFrames).toBe(false);
  });

  it('keeps web security on and refuses webviews, insecure content and drag-and-drop navigation', () => {
    expect(web.webSecurity).toBe(true);
    expect(web.allowRunningInsecureContent).toBe(false);
    expect(web.webviewTag).toBe(false);
    expect(web.navigateOnDragDrop).toBe(false);
  });

  it('loads the preload it was given and hides dev tools when asked', () => {
    expect(web.preload).toBe('/app/build/main/preload.cjs');
    expect(web.devTools).toBe(false);
    expect(windowOptions('/p.cjs', true).webPreferences!.devTools).toBe(true);
  });
});

describe('content security policy', () => {
  const directives = new Map(
    CONTENT_SECURITY_POLICY.split(';').map((d) => {
      const [name, ...values] = d.trim().split(/\s+/);
      return [name, values] as const;
    }),
  );

  it('denies by default and allows scripts only from the app itself (and its WebAssembly compiled)', () => {
    expect(directives.get('default-src')).toEqual(["'none'"]);
    expect(directives.get('script-src')).toEqual(["'self'", "'wasm-unsafe-eval'"]);
    expect(directives.get('object-src')).toEqual(["'none'"]);
    expect(directives.get('frame-ancestors')).toEqual(["'none'"]);
  });

  it('names no remote origin and allows no inline or eval script', () => {
    // 'wasm-unsafe-eval' (CSP Level 3) allows WebAssembly compilation only; 'unsafe-eval' would allow eval.
    expect(CONTENT_SECURITY_POLICY.replace("'wasm-unsafe-eval'", '')).not.toMatch(/https?:|\*|unsafe-eval|unsafe-inline|wss?:/);
  });
});

describe('navigation and requests', () => {
  it('accepts only the app origin', () => {
    expect(isAppUrl('falciform://app/index.html')).toBe(true);
    expect(isAppUrl('falciform://app/assets/x.js?v=1')).toBe(true);
    expect(isAppUrl('falciform://other/index.html')).toBe(false);
    expect(isAppUrl('https://example.org/')).toBe(false);
    expect(isAppUrl('file:///etc/passwd')).toBe(false);
    expect(isAppUrl('not a url')).toBe(false);
  });

  it('lets through in-memory data but cancels every network request', () => {
    expect(isAllowedRequest('blob:falciform://app/123')).toBe(true);
    expect(isAllowedRequest('data:image/png;base64,AA')).toBe(true);
    expect(isAllowedRequest('http://127.0.0.1:8080/')).toBe(false);
    expect(isAllowedRequest('https://example.org/tracker.js')).toBe(false);
    expect(isAllowedRequest('file:///home/user/scan.nii.gz')).toBe(false);
  });
});
