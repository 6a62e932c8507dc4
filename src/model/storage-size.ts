import type { InputRecord, VisitRecord, VolumeRecord } from './records.js';

const utf8 = new TextEncoder();

/**
 * Bytes one record takes when stored: its JSON text, with each byte array counted at the size of
 * the buffer behind it (structured cloning stores the whole buffer of a view, not just the view).
 * IndexedDB's own overhead differs by browser; this is the measure the storage budget is held to.
 */
export function recordBytes(record: object): number {
  let binary = 0;
  const json = JSON.stringify(record, (_key, value: unknown) => {
    if (ArrayBuffer.isView(value)) {
      binary += value.buffer.byteLength;
      return 0;
    }
    return value;
  });
  return utf8.encode(json).length + binary;
}

/** A visit's stored size: its own record (less the size field itself), its volumes and inputs. */
export function visitStoredBytes(visit: VisitRecord | Omit<VisitRecord, 'storedBytes'>, volumes: VolumeRecord[], inputs: InputRecord[]): number {
  const { storedBytes: _ignored, ...own } = visit as VisitRecord;
  let total = recordBytes(own);
  for (const v of volumes) total += recordBytes(v);
  for (const i of inputs) total += recordBytes(i);
  return total;
}
