import type { FalciformBridge, OpenedFile } from '../../main/bridge-api';

declare global {
  interface Window {
    falciform?: FalciformBridge;
  }
}

/** The desktop bridge when running in the Electron window; null in the browser-served app. */
export function desktopBridge(): FalciformBridge | null {
  return window.falciform ?? null;
}

/** Offers bytes as a file: the save dialog on the desktop, a download in the browser. */
export async function saveBytes(suggestedName: string, bytes: Uint8Array, mime: string): Promise<boolean> {
  const bridge = desktopBridge();
  if (bridge) return (await bridge.saveFile({ suggestedName, bytes })).saved;
  const url = URL.createObjectURL(new Blob([bytes as BlobPart], { type: mime }));
  const a = document.createElement('a');
  a.href = url;
  a.download = suggestedName;
  a.click();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
  return true;
}

/**
 * Where a saved file went, for the message after it: the desktop's save dialog showed the place
 * itself; the browser put it in its downloads folder without a word.
 */
export function savedWhere(name: string): string {
  return desktopBridge() ? '' : ` Saved as ${name} in this browser's downloads folder (the browser's download setting decides which).`;
}

/** Files chosen in a browser file input, as the same shape the desktop bridge returns. */
export async function filesFromInput(list: FileList): Promise<OpenedFile[]> {
  return Promise.all(
    Array.from(list, async (f) => ({
      relativePath: (f as File & { webkitRelativePath?: string }).webkitRelativePath || f.name,
      bytes: new Uint8Array(await f.arrayBuffer()),
    })),
  );
}
