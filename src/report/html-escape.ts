/**
 * Escaping for the board summary's HTML. Every text value goes through `esc`: the page is shown in
 * the app with innerHTML, so a patient id, file name or treatment label must never become markup.
 * The five characters are those HTML gives meaning to in text and in quoted attribute values.
 */
const ENTITIES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

export function esc(value: string | number): string {
  return String(value).replace(/[&<>"']/g, (c) => ENTITIES[c]);
}

/** A number for an SVG coordinate: short, and never NaN or exponent notation. */
export function n2(x: number): string {
  if (!Number.isFinite(x)) return '0';
  return String(Math.round(x * 100) / 100);
}
