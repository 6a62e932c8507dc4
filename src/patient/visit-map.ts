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
export type MapFiles = Pick<ManifestVisit, 'segments' | 'scheme' | 'liver' | 'landmarks' | 'caudate' | 'splitIV'>;

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
 * liver mask, landmark set and optional caudate mask. The one rule the analysis and the viewer share.
 */
export async function visitSegmentMap(v: MapFiles, read: VisitReader): Promise<VisitMap> {
  if (v.segments !== undefined) {
    const labels = await read.volume('segments', v.segments);
    const scheme = v.scheme === undefined || v.scheme === 'default' ? 'default' : parseScheme(await read.text('scheme', v.scheme), read.name(v.scheme));
    const imported = importSegmentMap(labels, scheme, read.name(v.segments));
    return { map: imported.map, source: 'imported', liver: labels, warnings: imported.warnings };
  }
  const liver = await read.volume('liver', v.liver as string);
  const landmarks = parseLandmarks(await read.text('landmarks', v.landmarks as string), read.name(v.landmarks as string));
  const caudate = v.caudate !== undefined ? await read.volume('caudate', v.caudate) : undefined;
  const built = buildSegmentMap(liver, landmarks, {
    caudate,
    splitIV: v.splitIV,
    file: read.name(v.landmarks as string),
    liverFile: read.name(v.liver as string),
    ...(v.caudate !== undefined ? { caudateFile: read.name(v.caudate) } : {}),
  });
  return { map: built.map, source: 'built', liver, landmarks, warnings: built.warnings };
}
