/**
 * Any thrown value as one line for the screen. A FalciformError is an Error whose message already
 * starts with the file it names.
 */
export function errorText(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}
