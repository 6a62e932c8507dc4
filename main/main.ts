import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { app, BrowserWindow, dialog, ipcMain, protocol, session, type FileFilter, type IpcMainInvokeEvent } from 'electron';
import {
  CHANNELS, MAX_OPEN_BYTES, openFilesRequest, parseRequest, printToPdfRequest, saveFileRequest,
} from './bridge-api.js';
import { readChosenFiles, writeFileAtomic } from './file-access.js';
import { APP_ORIGIN, APP_SCHEME, CONTENT_SECURITY_POLICY, isAllowedRequest, isAppUrl, windowOptions } from './security.js';
import { contentType, openRegularFile, resolveStaticPath } from './static-files.js';

const here = dirname(fileURLToPath(import.meta.url));
const rendererRoot = join(here, '..', 'renderer');

app.enableSandbox();
protocol.registerSchemesAsPrivileged([
  { scheme: APP_SCHEME, privileges: { standard: true, secure: true, supportFetchAPI: true, stream: true } },
]);

/** Serves the built renderer on falciform://app/ with the CSP on every response. */
async function serveApp(request: Request): Promise<Response> {
  const path = resolveStaticPath(rendererRoot, new URL(request.url).pathname);
  const file = path ? await openRegularFile(path) : null;
  if (!path || !file) return new Response('not found', { status: 404 });
  try {
    const body = await file.handle.readFile();
    return new Response(body, {
      headers: { 'content-type': contentType(path), 'content-security-policy': CONTENT_SECURITY_POLICY },
    });
  } catch {
    return new Response('not found', { status: 404 });
  } finally {
    await file.handle.close();
  }
}

/** Only the app's own page may call the bridge. */
function windowOf(event: IpcMainInvokeEvent): BrowserWindow {
  const win = BrowserWindow.fromWebContents(event.sender);
  if (!win || !event.senderFrame || !isAppUrl(event.senderFrame.url)) throw new Error('refused: caller is not the app');
  return win;
}

/** Asks where to save, then writes there whole; a cancelled dialog saves nothing. */
async function saveAs(win: BrowserWindow, options: { defaultPath: string; filters?: FileFilter[] }, bytes: Uint8Array): Promise<{ saved: boolean }> {
  const target = await dialog.showSaveDialog(win, options);
  if (target.canceled || !target.filePath) return { saved: false };
  await writeFileAtomic(target.filePath, bytes);
  return { saved: true };
}

function registerBridge(): void {
  ipcMain.handle(CHANNELS.openFiles, async (event, raw) => {
    const win = windowOf(event);
    const req = parseRequest(openFilesRequest, raw);
    const properties: ('openFile' | 'openDirectory' | 'multiSelections')[] = [req.folder ? 'openDirectory' : 'openFile'];
    if (req.multiple) properties.push('multiSelections');
    const chosen = await dialog.showOpenDialog(win, { title: req.title, filters: req.filters, properties });
    return chosen.canceled ? [] : readChosenFiles(chosen.filePaths, req.folder, MAX_OPEN_BYTES);
  });
  ipcMain.handle(CHANNELS.saveFile, async (event, raw) => {
    const win = windowOf(event);
    const req = parseRequest(saveFileRequest, raw);
    return saveAs(win, { defaultPath: req.suggestedName, filters: req.filters }, req.bytes);
  });
  ipcMain.handle(CHANNELS.printToPdf, async (event, raw) => {
    const win = windowOf(event);
    const req = parseRequest(printToPdfRequest, raw);
    const pdf = await win.webContents.printToPDF({ pageSize: req.pageSize, printBackground: true });
    return saveAs(win, { defaultPath: req.suggestedName, filters: [{ name: 'PDF', extensions: ['pdf'] }] }, pdf);
  });
}

app.on('web-contents-created', (_event, contents) => {
  contents.on('will-navigate', (e, url) => { if (!isAppUrl(url)) e.preventDefault(); });
  contents.on('will-redirect', (e, url) => { if (!isAppUrl(url)) e.preventDefault(); });
  contents.on('will-attach-webview', (e) => e.preventDefault());
  contents.setWindowOpenHandler(() => ({ action: 'deny' }));
});

app.on('window-all-closed', () => app.quit());

await app.whenReady();
session.defaultSession.setPermissionRequestHandler((_contents, _permission, callback) => callback(false));
// Synchronous permission checks (asked without a request, e.g. for device lists) are denied too.
session.defaultSession.setPermissionCheckHandler(() => false);
session.defaultSession.webRequest.onBeforeRequest((details, callback) => callback({ cancel: !isAllowedRequest(details.url) }));
protocol.handle(APP_SCHEME, serveApp);
registerBridge();

const win = new BrowserWindow(windowOptions(join(here, 'preload.cjs'), !app.isPackaged));
win.once('ready-to-show', () => win.show());
await win.loadURL(`${APP_ORIGIN}/index.html`);
