import { z } from 'zod';

/**
 * The desktop bridge: the only calls the renderer can make into the main process. Every argument
 * is parsed with these schemas in the main process before anything touches the file system.
 */
export const CHANNELS = {
  openFiles: 'falciform:open-files',
  saveFile: 'falciform:save-file',
  printToPdf: 'falciform:print-to-pdf',
} as const;

const fileFilter = z.strictObject({
  name: z.string().min(1).max(80),
  extensions: z.array(z.string().regex(/^[A-Za-z0-9.]{1,12}$/)).min(1).max(12),
});

/** A plain file name to suggest in the save dialog: no folders, no control characters. */
const fileName = z
  .string()
  .min(1)
  .max(120)
  .refine((n) => !/[/\\:*?"<>|]/.test(n) && ![...n].some((c) => c.charCodeAt(0) < 32), 'a plain file name without folders');

/** Below the 2 GiB that one file read can return in Node (fs.readFile refuses larger files). */
export const MAX_OPEN_BYTES = 2 * 1024 ** 3 - 1;
export const MAX_SAVE_BYTES = 1024 ** 3;

export const openFilesRequest = z.strictObject({
  title: z.string().max(120).optional(),
  /** A folder is read whole (a patient folder with its manifest); otherwise the chosen files. */
  folder: z.boolean().default(false),
  multiple: z.boolean().default(true),
  filters: z.array(fileFilter).max(8).optional(),
});

export const saveFileRequest = z.strictObject({
  suggestedName: fileName,
  bytes: z.custom<Uint8Array>((b) => b instanceof Uint8Array && b.byteLength <= MAX_SAVE_BYTES, 'must be bytes, at most 1 GiB'),
  filters: z.array(fileFilter).max(8).optional(),
});

export const printToPdfRequest = z.strictObject({
  suggestedName: fileName.refine((n) => n.toLowerCase().endsWith('.pdf'), 'a .pdf file name'),
  pageSize: z.enum(['A4', 'Letter']),
});

export type OpenFilesRequest = z.input<typeof openFilesRequest>;
export type SaveFileRequest = z.input<typeof saveFileRequest>;
export type PrintToPdfRequest = z.input<typeof printToPdfRequest>;

/** A file handed to the renderer: its path relative to the chosen folder (or its name) and bytes. */
export interface OpenedFile {
  relativePath: string;
  bytes: Uint8Array;
}

export interface FalciformBridge {
  openFiles(request: OpenFilesRequest): Promise<OpenedFile[]>;
  saveFile(request: SaveFileRequest): Promise<{ saved: boolean }>;
  printToPdf(request: PrintToPdfRequest): Promise<{ saved: boolean }>;
}

/** Parses one call's argument; a bad call is refused with a short reason and never reaches the disk. */
export function parseRequest<T extends z.ZodType>(schema: T, input: unknown): z.output<T> {
  const r = schema.safeParse(input);
  if (!r.success) {
    const first = r.error.issues[0];
    throw new Error(`refused: ${first.path.join('.') || 'argument'} ${first.message}`);
  }
  return r.data;
}
