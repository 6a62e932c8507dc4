import { badFile } from '../errors.js';
import { describeJsonValue, isJsonObject, parseJsonFile } from '../json-file.js';
import { isSegmentName, WHOLE_SEGMENTS, type SegmentName, type SegmentScheme } from './segment-map.js';

/**
 * The default scheme's value for each segment. IV and IVa share 4 so an unsplit map and a split one
 * colour segment IV alike; IVb takes 9, outside the run 1–8, so a 1–8 map never means IVb by accident.
 */
export const SEGMENT_CODES: Readonly<Record<SegmentName, number>> = {
  I: 1, II: 2, III: 3, IV: 4, IVa: 4, IVb: 9, V: 5, VI: 6, VII: 7, VIII: 8,
};

/**
 * The `default` scheme: 1–8 are segments I–VIII. When IV is split (the map holds value 9), 4 is IVa
 * and 9 is IVb; `importSegmentMap` decides that from the values present.
 */
export function defaultScheme(splitIV = false): SegmentScheme {
  const m = new Map<number, SegmentName>();
  WHOLE_SEGMENTS.forEach((name, n) => m.set(n + 1, name));
  if (splitIV) {
    m.set(4, 'IVa');
    m.set(9, 'IVb');
  }
  return m;
}

/** A scheme file: `{"labels": {"1": "I", "4": "IVa", "9": "IVb"}}`; values not listed are background. */
export function parseScheme(text: string, file: string): SegmentScheme {
  const json = parseJsonFile(text, file);
  const labels = isJsonObject(json) ? json.labels : undefined;
  if (!isJsonObject(labels)) throw badFile(file, 'a segment scheme needs an object "labels" mapping label values to segment names');
  const scheme = new Map<number, SegmentName>();
  for (const [key, name] of Object.entries(labels)) {
    const value = Number(key);
    if (key.trim() === '' || !Number.isInteger(value)) throw badFile(file, `label value "${key}" is not a whole number`);
    if (value === 0) throw badFile(file, 'label value 0 is background and cannot name a segment');
    if (typeof name !== 'string' || !isSegmentName(name)) {
      throw badFile(file, `label ${key}: unknown segment name ${describeJsonValue(name)} (expected one of I, II, III, IV, IVa, IVb, V, VI, VII, VIII)`);
    }
    scheme.set(value, name);
  }
  if (scheme.size === 0) throw badFile(file, 'the scheme lists no label values');
  const names = new Set(scheme.values());
  // A map with both IV and IVa/IVb would count part of IV twice in the volumes.
  if (names.has('IV') && (names.has('IVa') || names.has('IVb'))) {
    throw badFile(file, 'the scheme names IV together with IVa/IVb; use either IV or the split IVa and IVb');
  }
  return scheme;
}
