// Sandboxed preload: exposes the small desktop bridge and nothing else. Sandboxed preloads cannot
// require local modules, so the channel names are written out here; a unit test keeps them equal
// to main/bridge-api.ts.
import { contextBridge, ipcRenderer } from 'electron';

contextBridge.exposeInMainWorld('falciform', {
  openFiles: (request: unknown) => ipcRenderer.invoke('falciform:open-files', request),
  saveFile: (request: unknown) => ipcRenderer.invoke('falciform:save-file', request),
  printToPdf: (request: unknown) => ipcRenderer.invoke('falciform:print-to-pdf', request),
});
