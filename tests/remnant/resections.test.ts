import { describe, expect, it } from 'vitest';
import { expandRemoved, RESECTION_PRESETS, resectionPreset } from '../../src/remnant/resections.js';
import type { SegmentName } from '../../src/segments/segment-map.js';

// Source for every expectation here: Strasberg SM et al., The Brisbane 2000 terminology of liver
// anatomy and resections, HPB 2000;2:333-339 (hemiliver, section and segment resections, and the
// extended "trisectionectomies").
const BRISBANE: Record<string, string[]> = {
  'right-hemihepatectomy': ['V', 'VI', 'VII', 'VIII'],
  'left-hemihepatectomy': ['II', 'III', 'IV'],
  'right-anterior-sectionectomy': ['V', 'VIII'],
  'right-posterior-sectionectomy': ['VI', 'VII'],
  'left-medial-sectionectomy': ['IV'],
  'left-lateral-sectionectomy': ['II', 'III'],
  'right-trisectionectomy': ['IV', 'V', 'VI', 'VII', 'VIII'],
  'left-trisectionectomy': ['II', 'III', 'IV', 'V', 'VIII'],
  'segmentectomy-1': ['I'],
  'segmentectomy-2': ['II'],
  'segmentectomy-3': ['III'],
  'segmentectomy-4': ['IV'],
  'segmentectomy-5': ['V'],
  'segmentectomy-6': ['VI'],
  'segmentectomy-7': ['VII'],
  'segmentectomy-8': ['VIII'],
};

const WHOLE: SegmentName[] = ['I', 'II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII'];
const SPLIT: SegmentName[] = ['I', 'II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII'];

describe('resection presets remove the segments the Brisbane 2000 terminology names', () => {
  it('every preset, and only these presets', () => {
    expect(RESECTION_PRESETS.map((p) => p.id).sort()).toEqual(Object.keys(BRISBANE).sort());
    for (const p of RESECTION_PRESETS) {
      expect([...p.removes].sort(), p.id).toEqual([...BRISBANE[p.id]].sort());
      expect(expandRemoved(p.removes, WHOLE).removed.sort(), p.id).toEqual([...BRISBANE[p.id]].sort());
    }
  });

  it('names and alternative names', () => {
    expect(resectionPreset('right-hemihepatectomy')?.name).toBe('Right hemihepatectomy');
    expect(resectionPreset('right-hemihepatectomy')?.alsoCalled).toContain('Right hepatectomy');
    expect(resectionPreset('right-trisectionectomy')?.alsoCalled).toContain('Extended right hemihepatectomy');
    expect(resectionPreset('left-trisectionectomy')?.alsoCalled).toContain('Extended left hemihepatectomy');
    expect(resectionPreset('segmentectomy-6')?.name).toBe('Segmentectomy VI');
    expect(resectionPreset('no-such-operation')).toBeUndefined();
  });

  it('segment I is taken only by its own segmentectomy ("plus segment I" is added by hand)', () => {
    for (const p of RESECTION_PRESETS) expect(p.removes.includes('I')).toBe(p.id === 'segmentectomy-1');
  });

  it('on a map with IV split, removing IV removes both IVa and IVb (common practice: IV split at the portal plane)', () => {
    expect(expandRemoved(resectionPreset('left-hemihepatectomy')!.removes, SPLIT).removed).toEqual(['II', 'III', 'IVa', 'IVb']);
    expect(expandRemoved(resectionPreset('right-trisectionectomy')!.removes, SPLIT).removed).toEqual(['IVa', 'IVb', 'V', 'VI', 'VII', 'VIII']);
    expect(expandRemoved(['IVb'], SPLIT)).toEqual({ removed: ['IVb'], notFound: [] });
  });

  it('reports what the map cannot remove', () => {
    // IVa alone on a map that keeps IV whole; segment I on a map built without a caudate mask.
    expect(expandRemoved(['IVa', 'V'], WHOLE)).toEqual({ removed: ['V'], notFound: ['IVa'] });
    expect(expandRemoved(['I', 'II'], SPLIT.slice(1))).toEqual({ removed: ['II'], notFound: ['I'] });
  });
});
