import { useState, type ReactNode } from 'react';
import type { OpenedFile } from '../../main/bridge-api';

interface Props {
  onFiles: (files: OpenedFile[]) => void;
  disabled?: boolean;
  children: ReactNode;
}

/** Takes files or whole folders dropped on it, each file with its path inside the dropped folder. */
export function DropZone({ onFiles, disabled, children }: Props) {
  const [over, setOver] = useState(false);
  return (
    <div
      className={`drop-zone${over ? ' over' : ''}`}
      data-testid="drop-zone"
      onDragOver={(e) => {
        if (disabled) return;
        e.preventDefault();
        e.dataTransfer.dropEffect = 'copy';
        setOver(true);
      }}
      onDragLeave={() => setOver(false)}
      onDrop={(e) => {
        e.preventDefault();
        setOver(false);
        if (disabled) return;
        // The entries must be taken before this handler returns; the data transfer is emptied after.
        const entries = Array.from(e.dataTransfer.items, (i) => i.webkitGetAsEntry()).filter((x): x is FileSystemEntry => x !== null);
        void Promise.all(entries.map(readEntry)).then((lists) => onFiles(lists.flat()));
      }}
    >
      {children}
    </div>
  );
}

async function readEntry(entry: FileSystemEntry): Promise<OpenedFile[]> {
  if (entry.name.startsWith('.')) return [];
  if (entry.isFile) {
    const file = await new Promise<File>((resolve, reject) => (entry as FileSystemFileEntry).file(resolve, reject));
    return [{ relativePath: entry.fullPath.replace(/^\//, ''), bytes: new Uint8Array(await file.arrayBuffer()) }];
  }
  const reader = (entry as FileSystemDirectoryEntry).createReader();
  const children: FileSystemEntry[] = [];
  // readEntries hands a directory over in batches; an empty batch ends it.
  for (;;) {
    const batch = await new Promise<FileSystemEntry[]>((resolve, reject) => reader.readEntries(resolve, reject));
    if (batch.length === 0) break;
    children.push(...batch);
  }
  return (await Promise.all(children.map(readEntry))).flat();
}
