/**
 * CSV as RFC 4180 writes it (Shafranovich, Common Format and MIME Type for CSV Files, 2005): records
 * end in CRLF, the last one too; a field holding a comma, a double quote, CR or LF is enclosed in
 * double quotes, and a double quote inside is doubled. A leading space or tab is quoted as well, as
 * some spreadsheet programs trim it otherwise. UTF-8 without a byte-order mark: RFC 4180 has none,
 * and a BOM would become part of the first column's name in many readers.
 */
const NEEDS_QUOTES = /[",\r\n]|^[ \t]|[ \t]$/;

export function csvField(value: string): string {
  return NEEDS_QUOTES.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

function csvRecord(fields: readonly string[]): string {
  return `${fields.map(csvField).join(',')}\r\n`;
}

/** A header record and one record per row, the row's values taken in the header's order. */
export function toCsv<K extends string>(columns: readonly K[], rows: readonly Readonly<Record<K, string>>[]): string {
  return csvRecord(columns) + rows.map((r) => csvRecord(columns.map((c) => r[c]))).join('');
}

export function utf8(text: string): Uint8Array {
  return new TextEncoder().encode(text);
}
