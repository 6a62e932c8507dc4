/**
 * `x` rounded to `digits` decimal places, the one rounding every output uses (JSON, CSV, follow-up
 * sums). −0 comes back as 0: JSON writes −0 as 0 but text shows "-0", and the two must agree.
 */
export function roundTo(x: number, digits: number): number {
  const f = 10 ** digits;
  const r = Math.round(x * f) / f;
  return r === 0 ? 0 : r;
}
