import type { Manifest } from '../manifest/manifest.js';
import { loadPatientFrom, type LoadedVisit, type LoadOptions, type PatientFiles } from '../patient/load.js';
import type { SegmentMap } from '../segments/segment-map.js';

/**
 * Loads and analyses one visit as the follow-up does, keeping its segment map for export as well.
 * One visit at a time, so exporting a long series never holds every map at once; the visit comes
 * back without the map, ready to join the others for follow-up.
 */
export async function loadVisitWithMap(
  manifest: Manifest,
  manifestFile: string,
  source: PatientFiles,
  visitId: string,
  opts: LoadOptions = {},
): Promise<{ visit: LoadedVisit; segmentMap: SegmentMap }> {
  const mv = manifest.visits.find((v) => v.id === visitId);
  if (!mv) throw new Error(`visit ${visitId} is not in the manifest`);
  const one = await loadPatientFrom({ ...manifest, visits: [mv] }, manifestFile, source, { ...opts, keepSegmentMaps: true });
  const { segmentMap, ...visit } = one.visits[0];
  return { visit, segmentMap: segmentMap! };
}
