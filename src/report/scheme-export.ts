import { defaultScheme } from '../segments/scheme.js';
import type { SegmentScheme } from '../segments/segment-map.js';

const same = (a: SegmentScheme, b: SegmentScheme) => a.size === b.size && [...a].every(([v, s]) => b.get(v) === s);

/**
 * The scheme file (contracts: segment scheme) that names an exported map's values, or null when the
 * map uses the default scheme and needs none.
 */
export function customSchemeJson(scheme: SegmentScheme): string | null {
  if (same(scheme, defaultScheme(false)) || same(scheme, defaultScheme(true))) return null;
  const labels = Object.fromEntries([...scheme].sort((a, b) => a[0] - b[0]).map(([v, s]) => [String(v), s]));
  return `${JSON.stringify({ labels }, null, 2)}\n`;
}
