let trailSeq = 0;

/**
 * An edit-trail id. Entries made in the same millisecond share their time, and IndexedDB orders
 * equal index keys by primary key, so the id starts with the time and a counter to keep the order
 * in which the edits were made; its random tail keeps it unique across computers and backups.
 */
export function trailId(now = Date.now()): string {
  const seq = (trailSeq++ % 36 ** 4).toString(36).padStart(4, '0');
  return `${now.toString(36).padStart(9, '0')}-${seq}-${crypto.randomUUID().slice(0, 13)}`;
}

/** Copies bytes that are a view into a larger buffer: IndexedDB stores a view's whole buffer. */
export function ownBytes(bytes: Uint8Array): Uint8Array {
  return bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength && bytes.buffer instanceof ArrayBuffer
    ? bytes
    : bytes.slice();
}

/** Drops fields set to undefined, so a record reads back the same from the store and from JSON. */
export function compact<T extends object>(record: T): T {
  const out = { ...record };
  for (const k of Object.keys(out) as (keyof T)[]) if (out[k] === undefined) delete out[k];
  return out;
}
