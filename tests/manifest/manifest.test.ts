import { describe, expect, it } from 'vitest';
import { parseManifest, resolveManifestPath } from '../../src/manifest/manifest.js';

// The example manifest of the contracts (shared/docs/contracts.md, "Study manifest").
const example = {
  patient: { id: 'DEMO-0001', birthYear: 1961, heightCm: 172, weightKg: 80 },
  marginMm: 10,
  visits: [
    { id: 'v2', date: '2026-03-02', scan: 'v2/scan.nii.gz', liver: 'v2/liver.nii.gz', landmarks: 'v2/landmarks.json', marks: 'v2/marks.json' },
    { id: 'v1', date: '2026-01-12', scan: 'v1/scan.nii.gz', segments: 'v1/segments.nii.gz', scheme: 'default', lesions: 'v1/lesions.nii.gz' },
  ],
  targets: ['A', 'C'],
};

const parse = (m: unknown) => parseManifest(JSON.stringify(m), 'p/manifest.json');

describe('study manifest', () => {
  it('reads the contract example and orders visits by date', () => {
    const m = parse(example);
    expect(m.patient.id).toBe('DEMO-0001');
    expect(m.visits.map((v) => v.id)).toEqual(['v1', 'v2']);
    expect(m.targets).toEqual(['A', 'C']);
  });

  it('defaults the margin to 10 mm', () => {
    const { marginMm: _drop, ...rest } = example;
    expect(parse(rest).marginMm).toBe(10);
  });

  it('names the file and the field for each problem', () => {
    expect(() => parseManifest('{"patient":', 'p/manifest.json')).toThrow(/^p\/manifest\.json: is not valid JSON/);
    const noMap = { ...example, visits: [{ id: 'v1', date: '2026-01-12', scan: 's', lesions: 'l' }] };
    expect(() => parse(noMap)).toThrow(/p\/manifest\.json: field visits\[0\] must give either "segments" or both "liver" \(or "liverSeedMm"\) and "landmarks"/);
    const badDate = { ...example, visits: [{ ...example.visits[1], date: '2026-02-30' }] };
    expect(() => parse(badDate)).toThrow(/field visits\[0\]\.date must be a real date/);
    const twice = { ...example, visits: [example.visits[1], { ...example.visits[0], id: 'v1' }] };
    expect(() => parse(twice)).toThrow(/repeats visit id "v1"/);
    expect(() => parse({ ...example, extra: 1 })).toThrow(/p\/manifest\.json: /);
    expect(() => parse({ ...example, visits: [] })).toThrow(/at least one visit/);
  });

  it('takes a liver seed point instead of a liver mask, not both', () => {
    const seeded = { ...example, visits: [{ id: 'v1', date: '2026-01-12', scan: 's', liverSeedMm: [70, 0, 30], landmarks: 'l.json', marks: 'm.json' }] };
    expect(parse(seeded).visits[0].liverSeedMm).toEqual([70, 0, 30]);
    const both = { ...example, visits: [{ ...seeded.visits[0], liver: 'liver.nii.gz' }] };
    expect(() => parse(both)).toThrow(/must give "liver" or "liverSeedMm", not both/);
    const short = { ...example, visits: [{ ...seeded.visits[0], liverSeedMm: [70, 0] }] };
    expect(() => parse(short)).toThrow(/visits\[0\]\.liverSeedMm/);
  });

  it('resolves paths relative to the manifest folder', () => {
    expect(resolveManifestPath('data/p1/manifest.json', 'v1/scan.nii.gz')).toBe('data/p1/v1/scan.nii.gz');
    expect(resolveManifestPath('manifest.json', 'v1/scan.nii.gz')).toBe('v1/scan.nii.gz');
    expect(resolveManifestPath('data/manifest.json', '/abs/scan.nii')).toBe('/abs/scan.nii');
  });

  describe('proposed resection (docs/formats.md, "Proposed resection")', () => {
    it('takes a Brisbane 2000 preset id or a list of segments, and is optional', () => {
      expect(parse(example).resection).toBeUndefined();
      expect(parse({ ...example, resection: { preset: 'right-hemihepatectomy' } }).resection).toEqual({ preset: 'right-hemihepatectomy' });
      expect(parse({ ...example, resection: { segments: ['V', 'VI'] } }).resection).toEqual({ segments: ['V', 'VI'] });
      expect(parse({ ...example, resection: { segments: ['IVb'] } }).resection).toEqual({ segments: ['IVb'] });
    });

    it('names the field for each problem', () => {
      expect(() => parse({ ...example, resection: { preset: 'left-lobectomy' } }))
        .toThrow(/^p\/manifest\.json: field resection\.preset must be one of right-hemihepatectomy, left-hemihepatectomy, /);
      expect(() => parse({ ...example, resection: { segments: ['V', 'IX'] } }))
        .toThrow(/field resection\.segments\[1\] must be one of I, II, III, IV, IVa, IVb, V, VI, VII, VIII/);
      expect(() => parse({ ...example, resection: { segments: [] } })).toThrow(/field resection\.segments must list at least one segment/);
      expect(() => parse({ ...example, resection: { segments: ['V', 'V'] } })).toThrow(/field resection\.segments must not repeat a segment/);
      expect(() => parse({ ...example, resection: {} })).toThrow(/field resection must give either "preset" or "segments"/);
      expect(() => parse({ ...example, resection: { preset: 'segmentectomy-5', segments: ['V'] } })).toThrow(/field resection must give either/);
      expect(() => parse({ ...example, resection: { preset: 'segmentectomy-5', margin: 1 } })).toThrow(/field resection/);
    });
  });
});
