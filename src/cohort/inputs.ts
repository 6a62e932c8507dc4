import type { Manifest } from '../manifest/manifest.js';

/**
 * Every file a manifest names, as written in it (relative to the manifest), each once and sorted, so
 * the batch can tell whether a patient's inputs changed since its result was made.
 */
export function manifestInputFiles(manifest: Manifest): string[] {
  const files = new Set<string>();
  for (const v of manifest.visits) {
    for (const f of [v.scan, v.segments, v.liver, v.landmarks, v.caudate, v.lesions, v.marks, v.viable]) if (f !== undefined) files.add(f);
    if (v.scheme !== undefined && v.scheme !== 'default') files.add(v.scheme);
  }
  return [...files].sort();
}
