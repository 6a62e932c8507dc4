/** A calendar date as YYYY-MM-DD (ISO 8601), the form every other date in the app takes. */
export const ISO_DATE = /^\d{4}-(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/;

/**
 * A date field that reads and writes ISO dates whatever the browser's locale: the native date input
 * shows the locale's order (e.g. 03/05/2026), which reads two ways beside the app's ISO dates.
 */
export function IsoDateInput(props: { value: string; onChange(value: string): void; testId?: string; required?: boolean }) {
  return (
    <input
      type="text"
      inputMode="numeric"
      placeholder="YYYY-MM-DD"
      pattern="\d{4}-\d{2}-\d{2}"
      maxLength={10}
      required={props.required ?? true}
      value={props.value}
      onChange={(e) => props.onChange(e.target.value.trim())}
      title="Date as YYYY-MM-DD"
      data-testid={props.testId}
    />
  );
}
