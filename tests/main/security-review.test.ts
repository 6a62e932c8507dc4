// Desktop security review as tests. The main process (main/main.ts) runs here against a stand-in for
// Electron that records what it wires up, so the checks exercise its real handlers: navigation and
// window-open blocking, permission and request filtering, the app protocol's CSP, and the bridge's
// validation. The preload runs in a bare VM context. The renderer's sources and the built app are
// searched for Node, shell and remote-URL use. Checklist: Electron's security tutorial
// (electronjs.org/docs/latest/tutorial/security), from memory.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { extname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runInNewContext } from 'node:vm';
import ts from 'typescript';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { CHANNELS } from '../../main/bridge-api.js';
import { CONTENT_SECURITY_POLICY, isAppUrl, windowOptions } from '../../main/security.js';
import { startWebServer, type WebServer } from '../../main/web-server.js';

const root = fileURLToPath(new URL('../../', import.meta.url));

type Listener = (...args: unknown[]) => unknown;
interface FakeContents {
  listeners: Map<string, Listener>;
  openHandler: ((details: { url: string }) => unknown) | null;
  on(event: string, listener: Listener): FakeContents;
  setWindowOpenHandler(handler: (details: { url: string }) => unknown): void;
  printToPDF(options: unknown): Promise<Uint8Array>;
}

// What the main process registered with Electron, recorded by the stand-in below.
const wired = vi.hoisted(() => ({
  enableSandbox: 0,
  appListeners: new Map<string, (...args: unknown[]) => unknown>(),
  privilegedSchemes: [] as { scheme: string; privileges: Record<string, boolean> }[],
  protocolHandlers: new Map<string, (request: Request) => Promise<Response>>(),
  permissionHandler: null as null | ((contents: unknown, permission: string, callback: (granted: boolean) => void) => void),
  permissionCheck: null as null | ((contents: unknown, permission: string, origin: string, details: unknown) => boolean),
  beforeRequest: null as null | ((details: { url: string }, callback: (r: { cancel: boolean }) => void) => void),
  ipcHandlers: new Map<string, (event: unknown, raw: unknown) => Promise<unknown>>(),
  windows: [] as { options: unknown; loadedUrl: string | null; webContents: unknown }[],
  /** Dialogs opened and PDFs printed: a refused call must reach none of them. */
  sideEffects: [] as string[],
}));

vi.mock('electron', () => {
  class BrowserWindow {
    options: unknown;
    loadedUrl: string | null = null;
    webContents = {
      printToPDF: async () => {
        wired.sideEffects.push('printToPDF');
        return new Uint8Array([0x25, 0x50, 0x44, 0x46]);
      },
    };
    constructor(options: unknown) {
      this.options = options;
      wired.windows.push(this);
    }
    once() { return this; }
    show() {}
    async loadURL(url: string) { this.loadedUrl = url; }
    static fromWebContents(contents: unknown) { return wired.windows.find((w) => w.webContents === contents) ?? null; }
  }
  return {
    app: {
      isPackaged: false,
      enableSandbox: () => { wired.enableSandbox++; },
      on: (event: string, listener: (...args: unknown[]) => unknown) => { wired.appListeners.set(event, listener); },
      whenReady: async () => undefined,
      quit: () => undefined,
    },
    BrowserWindow,
    dialog: {
      showOpenDialog: async () => { wired.sideEffects.push('showOpenDialog'); return { canceled: true, filePaths: [] }; },
      showSaveDialog: async () => { wired.sideEffects.push('showSaveDialog'); return { canceled: true }; },
    },
    ipcMain: { handle: (channel: string, handler: (event: unknown, raw: unknown) => Promise<unknown>) => { wired.ipcHandlers.set(channel, handler); } },
    protocol: {
      registerSchemesAsPrivileged: (schemes: { scheme: string; privileges: Record<string, boolean> }[]) => { wired.privilegedSchemes.push(...schemes); },
      handle: (scheme: string, handler: (request: Request) => Promise<Response>) => { wired.protocolHandlers.set(scheme, handler); },
    },
    session: {
      defaultSession: {
        setPermissionRequestHandler: (h: typeof wired.permissionHandler) => { wired.permissionHandler = h; },
        setPermissionCheckHandler: (h: typeof wired.permissionCheck) => { wired.permissionCheck = h; },
        webRequest: { onBeforeRequest: (h: typeof wired.beforeRequest) => { wired.beforeRequest = h; } },
      },
    },
  };
});

beforeAll(async () => {
  await import('../../main/main.js');
});

// A web page's own URL, and others it might try to reach.
const FOREIGN_URLS = [
  'https://example.org/', 'http://127.0.0.1:8080/', 'http://localhost/', 'file:///etc/passwd', 'falciform://other/index.html',
  'javascript:alert(1)', 'data:text/html,<script>alert(1)</script>', 'ws://example.org/socket', 'about:blank',
];

describe('main process: the window', () => {
  it('opens one sandboxed, isolated window without Node, on the app origin', () => {
    expect(wired.enableSandbox).toBe(1);
    expect(wired.windows).toHaveLength(1);
    const [win] = wired.windows;
    const mainDir = join(root, 'main');
    // Electron's isPackaged is false here, so dev tools are on; everything else as reviewed in security.test.ts.
    expect(win.options).toEqual(windowOptions(join(mainDir, 'preload.cjs'), true));
    const web = (win.options as { webPreferences: Record<string, unknown> }).webPreferences;
    expect(web).toMatchObject({
      contextIsolation: true, sandbox: true, nodeIntegration: false, nodeIntegrationInWorker: false, nodeIntegrationInSubFrames: false,
      webSecurity: true, allowRunningInsecureContent: false, webviewTag: false,
    });
    // No remote content: the only page ever loaded is the app's own.
    expect(win.loadedUrl).toBe('falciform://app/index.html');
    expect(isAppUrl(win.loadedUrl!)).toBe(true);
  });

  it('registers only its own scheme, secure and standard, without bypassing the CSP', () => {
    expect(wired.privilegedSchemes.map((s) => s.scheme)).toEqual(['falciform']);
    const { privileges } = wired.privilegedSchemes[0];
    expect(privileges.secure).toBe(true);
    expect(privileges.standard).toBe(true);
    expect(privileges.bypassCSP ?? false).toBe(false);
    expect(privileges.corsEnabled ?? false).toBe(false);
    expect(privileges.allowServiceWorkers ?? false).toBe(false);
  });
});

describe('main process: navigation, new windows, permissions and requests', () => {
  const contents: FakeContents = {
    listeners: new Map(),
    openHandler: null,
    on(event, listener) { this.listeners.set(event, listener); return this; },
    setWindowOpenHandler(handler) { this.openHandler = handler; },
    printToPDF: async () => new Uint8Array(),
  };
  const prevented = (event: string, url?: string) => {
    let stopped = false;
    contents.listeners.get(event)!({ preventDefault: () => { stopped = true; } }, url);
    return stopped;
  };

  beforeAll(() => {
    // Every web contents Electron creates (windows, and any frame or view) goes through this hook.
    const created = wired.appListeners.get('web-contents-created');
    expect(created).toBeTypeOf('function');
    created!({}, contents);
  });

  it('blocks navigation and redirects away from the app origin', () => {
    for (const event of ['will-navigate', 'will-redirect']) {
      for (const url of FOREIGN_URLS) expect(prevented(event, url), `${event} ${url}`).toBe(true);
      expect(prevented(event, 'falciform://app/index.html')).toBe(false);
    }
  });

  it('refuses webviews and every window.open, even of the app itself', () => {
    expect(prevented('will-attach-webview')).toBe(true);
    for (const url of [...FOREIGN_URLS, 'falciform://app/index.html']) expect(contents.openHandler!({ url })).toEqual({ action: 'deny' });
  });

  it('denies every permission request', () => {
    const permissions = ['media', 'geolocation', 'notifications', 'midi', 'midiSysex', 'pointerLock', 'fullscreen', 'openExternal',
      'clipboard-read', 'clipboard-sanitized-write', 'display-capture', 'hid', 'serial', 'usb', 'storage-access', 'unknown'];
    for (const permission of permissions) {
      const answers: boolean[] = [];
      wired.permissionHandler!({}, permission, (granted) => answers.push(granted));
      expect(answers, permission).toEqual([false]);
      expect(wired.permissionCheck!({}, permission, 'falciform://app', {}), permission).toBe(false);
    }
  });

  it('cancels every request that is not the app itself or in-memory data', () => {
    const cancelled = (url: string) => {
      const replies: boolean[] = [];
      wired.beforeRequest!({ url }, (r) => replies.push(r.cancel));
      expect(replies).toHaveLength(1);
      return replies[0];
    };
    for (const url of [...FOREIGN_URLS.filter((u) => !u.startsWith('data:')), 'https://fonts.example.com/a.woff2', 'wss://example.org/', 'ftp://example.org/x']) {
      expect(cancelled(url), url).toBe(true);
    }
    for (const url of ['falciform://app/index.html', 'falciform://app/assets/index.js', 'data:image/png;base64,AA', 'blob:falciform://app/1234']) {
      expect(cancelled(url), url).toBe(false);
    }
  });
});

describe('main process: the app protocol', () => {
  const serve = (url: string) => wired.protocolHandlers.get('falciform')!(new Request(url));

  it('serves the app with the Content-Security-Policy on the response', async () => {
    expect([...wired.protocolHandlers.keys()]).toEqual(['falciform']);
    const res = await serve('falciform://app/index.html');
    expect(res.status).toBe(200);
    expect(res.headers.get('content-security-policy')).toBe(CONTENT_SECURITY_POLICY);
    expect(res.headers.get('content-type')).toMatch(/^text\/html/);
  });

  it('serves nothing outside the renderer folder', async () => {
    for (const path of ['%2e%2e/package.json', '..%2fpackage.json', '%2e%2e%2fmain%2fmain.ts', 'missing.js', '%00']) {
      expect((await serve(`falciform://app/${path}`)).status, path).toBe(404);
    }
  });
});

describe('main process: the bridge validates every call before anything else', () => {
  const appEvent = () => {
    const win = wired.windows[0];
    return { sender: win.webContents, senderFrame: { url: 'falciform://app/index.html' } };
  };
  const valid: Record<string, unknown> = {
    [CHANNELS.openFiles]: { folder: true },
    [CHANNELS.saveFile]: { suggestedName: 'case-form.csv', bytes: new Uint8Array([1, 2]) },
    [CHANNELS.printToPdf]: { suggestedName: 'board.pdf', pageSize: 'A4' },
  };
  const invalid: Record<string, unknown[]> = {
    [CHANNELS.openFiles]: [undefined, null, 'x', 42, [], { path: '/etc' }, { defaultPath: '/home' }, { folder: 'yes' }, { filters: [{ name: 'x', extensions: ['../..'] }] }],
    [CHANNELS.saveFile]: [undefined, {}, { suggestedName: '../../.bashrc', bytes: new Uint8Array(1) }, { suggestedName: '/etc/passwd', bytes: new Uint8Array(1) },
      { suggestedName: 'a.csv', bytes: 'text' }, { suggestedName: 'a.csv', bytes: [1, 2] }, { suggestedName: 'a.csv', bytes: new Uint8Array(1), path: '/tmp/a.csv' }],
    [CHANNELS.printToPdf]: [undefined, {}, { suggestedName: 'board.html', pageSize: 'A4' }, { suggestedName: 'board.pdf', pageSize: 'A0' },
      { suggestedName: '../board.pdf', pageSize: 'A4' }],
  };

  it('handles exactly the three channels the preload calls', () => {
    expect([...wired.ipcHandlers.keys()].sort()).toEqual(Object.values(CHANNELS).sort());
  });

  it('refuses a malformed argument on every channel and opens no dialog, prints nothing', async () => {
    for (const [channel, inputs] of Object.entries(invalid)) {
      for (const raw of inputs) {
        wired.sideEffects.length = 0;
        await expect(wired.ipcHandlers.get(channel)!(appEvent(), raw), `${channel} ${JSON.stringify(raw)}`).rejects.toThrow(/^refused: /);
        expect(wired.sideEffects).toEqual([]);
      }
    }
  });

  it('refuses a caller that is not the app page, even with a valid argument', async () => {
    const win = wired.windows[0];
    for (const [channel, raw] of Object.entries(valid)) {
      wired.sideEffects.length = 0;
      for (const event of [
        { sender: win.webContents, senderFrame: { url: 'https://example.org/' } },
        { sender: win.webContents, senderFrame: null },
        { sender: {}, senderFrame: { url: 'falciform://app/index.html' } },
      ]) {
        await expect(wired.ipcHandlers.get(channel)!(event, raw)).rejects.toThrow('refused: caller is not the app');
      }
      expect(wired.sideEffects).toEqual([]);
    }
  });

  it('passes a valid call through to its dialog', async () => {
    wired.sideEffects.length = 0;
    await expect(wired.ipcHandlers.get(CHANNELS.openFiles)!(appEvent(), valid[CHANNELS.openFiles])).resolves.toEqual([]);
    await expect(wired.ipcHandlers.get(CHANNELS.saveFile)!(appEvent(), valid[CHANNELS.saveFile])).resolves.toEqual({ saved: false });
    await expect(wired.ipcHandlers.get(CHANNELS.printToPdf)!(appEvent(), valid[CHANNELS.printToPdf])).resolves.toEqual({ saved: false });
    expect(wired.sideEffects).toEqual(['showOpenDialog', 'showSaveDialog', 'printToPDF', 'showSaveDialog']);
  });
});

/** Source text with comments removed (a "//" right after ":" is a URL, not a comment). */
function code(text: string): string {
  return text.replace(/\/\*[\s\S]*?\*\//g, '').replace(/(^|[^:\\])\/\/.*$/gm, '$1');
}

function filesUnder(dir: string, exts: string[]): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { recursive: true, encoding: 'utf8' })
    .map((f) => join(dir, f))
    .filter((f) => exts.includes(extname(f)) && statSync(f).isFile());
}

describe('main process source', () => {
  const sources = filesUnder(join(root, 'main'), ['.ts', '.cts']).filter((f) => !f.endsWith('.d.ts'));

  it('never reaches a shell, a child process or remote pages, and never weakens the window', () => {
    expect(sources.length).toBeGreaterThan(3);
    for (const file of sources) {
      const text = code(readFileSync(file, 'utf8'));
      const where = relative(root, file);
      expect(text, where).not.toMatch(/\bshell\b|openExternal|child_process|executeJavaScript|\beval\(|new Function\(/);
      expect(text, where).not.toMatch(/nodeIntegration\w*:\s*true|contextIsolation:\s*false|sandbox:\s*false|webSecurity:\s*false|allowRunningInsecureContent:\s*true|webviewTag:\s*true/);
      expect(text, where).not.toMatch(/loadURL\(\s*['"`]https?:|loadFile\(/);
      // Only invoke/handle: a renderer-to-main "send" channel would bypass the schemas.
      expect(text, where).not.toMatch(/ipcMain\.on\(|ipcMain\.once\(|ipcRenderer\.(send|sendSync|on)\(/);
    }
  });

  it('parses the argument of every bridge handler with a schema first', () => {
    const main = readFileSync(join(root, 'main/main.ts'), 'utf8');
    const handlers = main.split('ipcMain.handle(').slice(1);
    expect(handlers).toHaveLength(Object.keys(CHANNELS).length);
    for (const body of handlers) {
      // The raw argument's first use is the schema parse, right after the caller check.
      const m = body.match(/^CHANNELS\.(\w+), async \(event, raw\) => \{\s*const win = windowOf\(event\);\s*const req = parseRequest\((\w+Request), raw\);/);
      expect(m, body.slice(0, 120)).not.toBeNull();
      expect(m![2]).toBe(`${m![1]}Request`);
      // "raw" appears twice: the parameter and the parse; never handed on unparsed.
      expect(body.match(/\braw\b/g)).toHaveLength(2);
    }
  });
});

describe('preload', () => {
  const source = readFileSync(join(root, 'main/preload.cts'), 'utf8');

  it('imports only contextBridge and ipcRenderer, and touches no Node API', () => {
    const imports = [...source.matchAll(/^import\s+(.+?)\s+from\s+['"]([^'"]+)['"]/gm)].map((m) => [m[1], m[2]]);
    expect(imports).toEqual([['{ contextBridge, ipcRenderer }', 'electron']]);
    expect(code(source)).not.toMatch(/\brequire\b|\bprocess\b|\bshell\b|\bfs\b|child_process|\bremote\b|webFrame|__dirname|Buffer/);
    expect(code(source)).not.toMatch(/ipcRenderer\.(send|sendSync|on|once|postMessage)\b/);
  });

  it('exposes three functions that each invoke one fixed channel with the argument, nothing else', async () => {
    // The preload compiled as Electron runs it (CommonJS) inside a bare context with a require that
    // knows only a stand-in for 'electron'.
    const js = ts.transpileModule(source, { compilerOptions: { module: ts.ModuleKind.CommonJS, target: ts.ScriptTarget.ES2022 } }).outputText;
    const required: string[] = [];
    const exposed: [string, unknown][] = [];
    const invoked: unknown[][] = [];
    const ipcRenderer = { invoke: (...args: unknown[]) => { invoked.push(args); return Promise.resolve('reply'); } };
    const contextBridge = { exposeInMainWorld: (key: string, api: unknown) => { exposed.push([key, api]); } };
    const module = { exports: {} };
    runInNewContext(js, {
      module, exports: module.exports,
      require: (name: string) => {
        required.push(name);
        if (name !== 'electron') throw new Error(`preload required ${name}`);
        return { contextBridge, ipcRenderer };
      },
    });
    expect(required).toEqual(['electron']);
    expect(exposed.map(([k]) => k)).toEqual(['falciform']);
    const api = exposed[0][1] as Record<string, unknown>;
    expect(Object.keys(api).sort()).toEqual(['openFiles', 'printToPdf', 'saveFile']);
    const expected: Record<string, string> = { openFiles: CHANNELS.openFiles, saveFile: CHANNELS.saveFile, printToPdf: CHANNELS.printToPdf };
    for (const [name, fn] of Object.entries(api)) {
      expect(fn, name).toBeTypeOf('function');
      invoked.length = 0;
      const arg = { probe: name };
      await expect((fn as (...a: unknown[]) => Promise<unknown>)(arg, 'extra', () => 'callback')).resolves.toBe('reply');
      // One call, on the fixed channel, with the argument and nothing the page added.
      expect(invoked).toEqual([[expected[name], arg]]);
      expect(invoked[0][1]).toBe(arg);
    }
    // Neither Electron object is reachable through the exposed values.
    for (const v of Object.values(api)) expect(v === ipcRenderer || v === contextBridge || v === ipcRenderer.invoke).toBe(false);
  });
});

// URL text that is never fetched. Our own sources may hold only the first group; the built bundle
// also carries text from its dependencies. A new URL in the bundle fails this test until someone has
// looked at it and added it here with the reason; the CSP, the desktop request filter and the
// offline end-to-end test make sure nothing is fetched in any case.
const NAMESPACES = [
  // XML namespace names (React DOM, SVG files) are identifiers.
  /^http:\/\/www\.w3\.org\/(2000\/svg|1999\/xlink|1999\/xhtml|1998\/Math\/MathML|XML\/1998\/namespace|2000\/xmlns\/?)$/,
];
const DEPENDENCY_TEXT = [
  // React: link to its error decoder, written into production error messages.
  /^https:\/\/react\.dev\/errors\/$/,
  // zod: "$schema" identifiers of its JSON Schema output, and the URL it parses to check an IPv6 literal.
  /^https?:\/\/json-schema\.org\/(draft-04\/schema#|draft-07\/schema#|draft\/2020-12\/schema)$/,
  /^http:\/\/\[\$\{\w+\}\]$/,
  // Dexie: links in the text of two of its error messages.
  /^https:\/\/tinyurl\.com\/y2uuvskb$/,
  /^http:\/\/bit\.ly\/2kdckMn$/,
  // Recharts keeps its state in Redux Toolkit: links in the text of their error messages.
  /^https:\/\/redux\.js\.org\/Errors\?code=\$\{e\}$/,
  /^https:\/\/redux-toolkit\.js\.org\/Errors\?code=\$\{e\}$/,
  /^https:\/\/bit\.ly\/3cXEKWf$/,
  // dicom-parser: its project page in the licence banner comment the bundler keeps (never fetched).
  /^https:\/\/github\.com\/cornerstonejs\/dicomParser$/,
  // The shipped fonts' licence texts, shown on the About screen: the OFL's home and each font project's
  // page in its copyright line (text for the reader, never fetched).
  /^http:\/\/scripts\.sil\.org\/OFL$/,
  /^https:\/\/github\.com\/googlefonts\/atkinson-hyperlegible-next(-mono)?$/,
];
const REMOTE_URL = /\b(?:https?|wss?|ftp):\/\/[^\s'"`)<>\\]*/g;

function remoteUrls(text: string, allowed: readonly RegExp[] = NAMESPACES): string[] {
  return [...text.matchAll(REMOTE_URL)].map((m) => m[0]).filter((u) => !allowed.some((re) => re.test(u)));
}

describe('renderer', () => {
  const sources = filesUnder(join(root, 'renderer'), ['.ts', '.tsx', '.html', '.css', '.svg', '.json']);

  it('source never imports Node or Electron, nor reaches a shell', () => {
    expect(sources.length).toBeGreaterThan(3);
    for (const file of sources) {
      const text = code(readFileSync(file, 'utf8'));
      const where = relative(root, file);
      expect(text, where).not.toMatch(/from\s+['"](electron|node:[\w/]+|fs|fs\/promises|path|os|child_process|net|http|https|worker_threads)['"]/);
      expect(text, where).not.toMatch(/\brequire\(|child_process|openExternal|\bshell\.|\beval\(|new Function\(/);
    }
  });

  it('source names no remote URL (outside comments and XML namespaces)', () => {
    for (const file of sources) {
      const text = code(readFileSync(file, 'utf8'));
      expect(remoteUrls(text), relative(root, file)).toEqual([]);
      // Protocol-relative references would load from the network too.
      expect(text, relative(root, file)).not.toMatch(/(src|href)\s*=\s*["']\/\/|url\(\s*["']?\/\//);
    }
  });

  describe('the built app (build/renderer)', () => {
    const out = join(root, 'build/renderer');

    beforeAll(() => {
      // npm test builds first; when this file runs alone and there is no build, make one.
      if (!existsSync(join(out, 'index.html'))) spawnSync('npx', ['vite', 'build'], { cwd: root, encoding: 'utf8' });
      expect(existsSync(join(out, 'index.html'))).toBe(true);
    }, 240_000);

    it('names no remote URL in any script, style, page or image, beyond reviewed dependency text', () => {
      const files = filesUnder(out, ['.js', '.mjs', '.css', '.html', '.svg', '.json', '.webmanifest']);
      expect(files.some((f) => f.endsWith('.js'))).toBe(true);
      for (const file of files) {
        expect(remoteUrls(readFileSync(file, 'utf8'), [...NAMESPACES, ...DEPENDENCY_TEXT]), relative(root, file)).toEqual([]);
      }
    });

    it('loads its scripts and styles from the app itself, with no inline script for the CSP to refuse', () => {
      const html = readFileSync(join(out, 'index.html'), 'utf8');
      const refs = [...html.matchAll(/\b(?:src|href)\s*=\s*["']([^"']+)["']/g)].map((m) => m[1]);
      expect(refs.length).toBeGreaterThan(1);
      // Relative to the app, or the inline data: icon (nothing to fetch).
      for (const ref of refs) expect(ref, ref).toMatch(/^(\.?\/(?!\/)|data:image\/svg\+xml,)/);
      for (const m of html.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/g)) {
        expect(m[1]).toMatch(/\bsrc=/);
        expect(m[2].trim()).toBe('');
      }
      expect(html).not.toMatch(/\son\w+\s*=/i);
    });
  });
});

describe('Content-Security-Policy', () => {
  let server: WebServer;
  let dir: string;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'falciform-csp-'));
    mkdirSync(join(dir, 'assets'));
    writeFileSync(join(dir, 'index.html'), '<!doctype html><title>t</title>');
    writeFileSync(join(dir, 'assets', 'a.js'), 'export {};');
    server = await startWebServer(dir, 0);
  });

  afterAll(async () => {
    await server?.close();
    rmSync(dir, { recursive: true, force: true });
  });

  it('allows nothing but the app itself and in-memory data, in every directive', () => {
    const directives = CONTENT_SECURITY_POLICY.split(';').map((d) => d.trim().split(/\s+/));
    expect(directives.map(([name]) => name)).toContain('default-src');
    for (const [name, ...sources] of directives) {
      for (const s of sources) expect(name === 'script-src' ? ["'self'", "'wasm-unsafe-eval'"] : ["'self'", "'none'", 'data:', 'blob:'], `${name} ${s}`).toContain(s);
    }
    // Scripts only from files of the app: no data:, blob:, inline or eval; WebAssembly may be compiled
    // (the bundled JPEG-LS and JPEG 2000 decoders), which 'wasm-unsafe-eval' allows and nothing more.
    expect(directives.find(([n]) => n === 'script-src')!.slice(1)).toEqual(["'self'", "'wasm-unsafe-eval'"]);
  });

  it('is sent by the local web server on every page and script, as by the desktop protocol', async () => {
    for (const path of ['', 'index.html', 'assets/a.js']) {
      const res = await fetch(`${server.url}${path}`);
      expect(res.status, path).toBe(200);
      expect(res.headers.get('content-security-policy'), path).toBe(CONTENT_SECURITY_POLICY);
      expect(res.headers.get('x-content-type-options')).toBe('nosniff');
      await res.arrayBuffer();
    }
    const desktop = await wired.protocolHandlers.get('falciform')!(new Request('falciform://app/index.html'));
    expect(desktop.headers.get('content-security-policy')).toBe(CONTENT_SECURITY_POLICY);
    expect(new URL(server.url).hostname).toBe('127.0.0.1');
  });
});
