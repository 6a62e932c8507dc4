import { SEGMENT_NAMES, type SegmentMap, type SegmentName } from '../segments/segment-map.js';

/** Index into SEGMENT_NAMES for each segment; -1 is background. */
export type SegmentIndex = number;

export const BACKGROUND = -1;

export function segmentName(index: SegmentIndex): SegmentName | null {
  return index >= 0 ? SEGMENT_NAMES[index] : null;
}

export function segmentIndexOf(name: SegmentName): SegmentIndex {
  return SEGMENT_NAMES.indexOf(name);
}

/**
 * Segment index of each voxel of a segment map, by linear index. Small integer types read a table
 * indexed by the stored value, so the hot loops do one array read per voxel; wider types fall back
 * to the scheme's Map, remembering the last value because label maps come in long runs.
 */
export function segmentLookup(map: SegmentMap): (n: number) => SegmentIndex {
  let lookup = cache.get(map);
  if (!lookup) {
    lookup = buildLookup(map);
    cache.set(map, lookup);
  }
  return lookup;
}

// Every lesion and mark of a visit asks for the same map's lookup; a 16-bit table is worth keeping.
const cache = new WeakMap<SegmentMap, (n: number) => SegmentIndex>();

function buildLookup(map: SegmentMap): (n: number) => SegmentIndex {
  const { data, slope, inter } = map.labels;
  const indexOfValue = (value: number): SegmentIndex => {
    const name = map.scheme.get(value);
    return name === undefined ? BACKGROUND : segmentIndexOf(name);
  };
  if (data instanceof Uint8Array || data instanceof Int8Array || data instanceof Uint16Array || data instanceof Int16Array) {
    const offset = data instanceof Int8Array ? 128 : data instanceof Int16Array ? 32768 : 0;
    const size = data instanceof Uint8Array || data instanceof Int8Array ? 256 : 65536;
    const table = new Int8Array(size);
    for (let s = 0; s < size; s++) table[s] = indexOfValue((s - offset) * slope + inter);
    return (n) => table[data[n] + offset];
  }
  let lastRaw = NaN;
  let lastIndex: SegmentIndex = BACKGROUND;
  return (n) => {
    const raw = data[n];
    if (raw !== lastRaw) {
      lastRaw = raw;
      lastIndex = indexOfValue(raw * slope + inter);
    }
    return lastIndex;
  };
}
