// The part of Electron's API the shell uses, pinned here so main/ typechecks where the Electron
// package (and its own typings) could not be installed because its binary cannot be downloaded.
// Names and signatures follow Electron 45's electron.d.ts.

export interface WebPreferences {
  preload?: string;
  contextIsolation?: boolean;
  sandbox?: boolean;
  nodeIntegration?: boolean;
  nodeIntegrationInWorker?: boolean;
  nodeIntegrationInSubFrames?: boolean;
  webSecurity?: boolean;
  allowRunningInsecureContent?: boolean;
  webviewTag?: boolean;
  navigateOnDragDrop?: boolean;
  spellcheck?: boolean;
  devTools?: boolean;
  safeDialogs?: boolean;
}

export interface BrowserWindowConstructorOptions {
  width?: number;
  height?: number;
  minWidth?: number;
  minHeight?: number;
  show?: boolean;
  title?: string;
  backgroundColor?: string;
  autoHideMenuBar?: boolean;
  webPreferences?: WebPreferences;
}

export interface Event {
  preventDefault(): void;
}

export interface PrintToPDFOptions {
  pageSize?: 'A4' | 'Letter';
  printBackground?: boolean;
  landscape?: boolean;
}

export interface WebContents {
  id: number;
  on(event: 'will-navigate' | 'will-redirect', listener: (event: Event, url: string) => void): this;
  on(event: 'will-attach-webview', listener: (event: Event) => void): this;
  setWindowOpenHandler(handler: (details: { url: string }) => { action: 'deny' } | { action: 'allow' }): void;
  printToPDF(options: PrintToPDFOptions): Promise<Uint8Array>;
  getURL(): string;
}

export class BrowserWindow {
  constructor(options?: BrowserWindowConstructorOptions);
  webContents: WebContents;
  loadURL(url: string): Promise<void>;
  once(event: 'ready-to-show', listener: () => void): this;
  show(): void;
  static fromWebContents(webContents: WebContents): BrowserWindow | null;
}

export interface FileFilter {
  name: string;
  extensions: string[];
}

export interface OpenDialogReturnValue {
  canceled: boolean;
  filePaths: string[];
}

export interface SaveDialogReturnValue {
  canceled: boolean;
  filePath?: string;
}

export const dialog: {
  showOpenDialog(
    window: BrowserWindow,
    options: { title?: string; filters?: FileFilter[]; properties?: ('openFile' | 'openDirectory' | 'multiSelections')[] },
  ): Promise<OpenDialogReturnValue>;
  showSaveDialog(window: BrowserWindow, options: { title?: string; defaultPath?: string; filters?: FileFilter[] }): Promise<SaveDialogReturnValue>;
};

export interface IpcMainInvokeEvent {
  sender: WebContents;
  senderFrame: { url: string } | null;
}

export const ipcMain: {
  handle(channel: string, listener: (event: IpcMainInvokeEvent, ...args: unknown[]) => Promise<unknown> | unknown): void;
};

export interface CustomScheme {
  scheme: string;
  privileges?: { standard?: boolean; secure?: boolean; supportFetchAPI?: boolean; corsEnabled?: boolean; stream?: boolean };
}

export const protocol: {
  registerSchemesAsPrivileged(customSchemes: CustomScheme[]): void;
  handle(scheme: string, handler: (request: Request) => Response | Promise<Response>): void;
};

export interface Session {
  setPermissionRequestHandler(
    handler: ((webContents: WebContents, permission: string, callback: (granted: boolean) => void) => void) | null,
  ): void;
  setPermissionCheckHandler(
    handler: ((webContents: WebContents | null, permission: string, requestingOrigin: string, details: unknown) => boolean) | null,
  ): void;
  webRequest: {
    onBeforeRequest(listener: (details: { url: string }, callback: (response: { cancel?: boolean }) => void) => void): void;
  };
}

export const session: { defaultSession: Session };

export const app: {
  whenReady(): Promise<void>;
  on(event: 'window-all-closed', listener: () => void): void;
  on(event: 'web-contents-created', listener: (event: Event, contents: WebContents) => void): void;
  quit(): void;
  isPackaged: boolean;
  getAppPath(): string;
  enableSandbox(): void;
};

export const contextBridge: {
  exposeInMainWorld(apiKey: string, api: unknown): void;
};

export const ipcRenderer: {
  invoke(channel: string, ...args: unknown[]): Promise<unknown>;
};
