import { badInput } from '../errors.js';
import { growLiver } from '../image/grow-liver.js';
import type { ManifestVisit } from '../manifest/manifest.js';
import { buildSegmentMap } from '../segments/build.js';
import { importSegmentMap } from '../segments/import.js';
import { parseLandmarks, type LandmarkSet } from '../segments/landmarks.js';
import { parseScheme } from '../segments/scheme.js';
import type { SegmentMap } from '../segments/segment-map.js';
import type { Volume } from '../volume/volume.js';

/** How a visit's files are read: by role (for messages and bookkeeping) and manifest path. */
export interface VisitReader {
  volume(role: string, path: string): Promise<Volume>;
  text(role: string, path: string): Promise<string>;
  name(path: string): string;
}

/** The manifest fields a visit's segment map comes from. */
export type MapFiles = Pick<ManifestVisit, 'segments' | 'scheme' | 'liver' | 'liverSeedMm' | 'landmarks' | 'caudate' | 'splitIV'>;

export interface VisitMap {
  map: SegmentMap;
  source: 'imported' | 'built';
  /** The volume whose voxels > 0 are liver: the imported map itself, or the liver mask. */
  liver: Volume;
  landmarks?: LandmarkSet;
  warnings: string[];
}

/**
 * A visit's segment map: the imported one with its scheme, or one built by the plane rule from the
 * liver mask (or one grown on `scan` from `liverSeedMm`), landmark set and optional caudate mask.
 * The one rule the analysis and the viewer share.
 */
export async function visitSegmentMap(v: MapFiles, read: VisitReader, scan?: Volume): Promise<VisitMap> {
  if (v.segments !== undefined) {
    const labels = await read.volume('segments', v.segments);
    const scheme = v.scheme === undefined || v.scheme === 'default' ? 'default' : parseScheme(await read.text('scheme', v.scheme), read.name(v.scheme));
    const imported = importSegmentMap(labels, scheme, read.name(v.segments));
    return { map: imported.map, source: 'imported', liver: labels, warnings: imported.warnings };
  }
  const seedWarnings: string[] = [];
  let liver: Volume;
  if (v.liver !== undefined) liver = await read.volume('liver', v.liver);
  else {
    if (!scan || !v.liverSeedMm) throw badInput('visit', 'a liver seed needs the visit\'s scan');
    const grown = growLiver({ scan, seedsMm: [v.liverSeedMm] });
    liver = grown.mask;
    const [lo, hi] = grown.params.window;
    seedWarnings.push(`liver mask grown from the seed (${v.liverSeedMm.join(', ')}) mm: ${grown.volumeMl.toFixed(0)} mL, ` +
      `window ${lo.toFixed(0)}–${hi.toFixed(0)}, opening ${grown.params.openingMm} mm; check it before relying on the segments`, ...grown.warnings);
  }
  const landmarks = parseLandmarks(await read.text('landmarks', v.landmarks as string), read.name(v.landmarks as string));
  const caudate = v.caudate !== undefined ? await read.volume('caudate', v.caudate) : undefined;
  const built = buildSegmentMap(liver, landmarks, {
    caudate,
    splitIV: v.splitIV,
    file: read.name(v.landmarks as string),
    liverFile: v.liver !== undefined ? read.name(v.liver) : 'liver grown from the seed',
    ...(v.caudate !== undefined ? { caudateFile: read.name(v.caudate) } : {}),
  });
  return { map: built.map, source: 'built', liver, landmarks, warnings: [...seedWarnings, ...built.warnings] };
}
