import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * The demo scenario as designed (demo-data/scenario.ts), checked through the command line a user
 * would run: `falciform followup demo-data/<patient>/manifest.json --json`. Response rules are
 * RECIST 1.1 (Eisenhauer et al., Eur J Cancer 2009;45:228-247) and mRECIST (Lencioni and Llovet,
 * Semin Liver Dis 2010;30:52-60); the margin rule is docs/formats.md's (to the border surface,
 * alert at or within 10 mm).
 */
interface Followup {
  criteria: string;
  visits: { id: string; overall: string | null; newLesions: string[]; goneLesions: string[]; marginAlerts: string[];
    response: { category: string | null; changeFromBaselinePct: number | null }; otherResponses: { criteria: string; category: string | null }[] }[];
  tracks: { id: string; segments: Record<string, string | null>; target: boolean; longestAxialMm: Record<string, number | null> }[];
}

function followup(patient: string): Followup {
  const r = spawnSync(process.execPath, ['bin/falciform.js', 'followup', `demo-data/${patient}/manifest.json`, '--json'], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(r.stderr);
  return JSON.parse(r.stdout) as Followup;
}

const category = (f: Followup) => f.visits.map((v) => v.overall);
const trackIn = (f: Followup, segment: string) => f.tracks.find((t) => Object.values(t.segments).includes(segment))!;

describe('demo scenario, as designed', () => {
  it('DEMO-0001: metastases in VII, V and II respond to chemotherapy (PR from the second visit on)', () => {
    const f = followup('DEMO-0001');
    expect(f.criteria).toBe('RECIST 1.1');
    // Baseline targets: the two largest measurable liver lesions (at most two per organ), VII and V.
    const targets = f.tracks.filter((t) => t.target).map((t) => t.segments.v1).sort();
    expect(targets).toEqual(['V', 'VII']);
    expect(trackIn(f, 'II').target).toBe(false);
    // Sum of target diameters falls by at least 30% from baseline: PR at every follow-up visit.
    expect(category(f)).toEqual([null, 'PR', 'PR', 'PR']);
    for (const v of f.visits.slice(1)) expect(v.response.changeFromBaselinePct!).toBeLessThanOrEqual(-30);
    // Every lesion keeps its track across visits despite patient motion; nothing new, nothing gone.
    expect(f.tracks).toHaveLength(3);
    for (const t of f.tracks) expect(Object.values(t.segments)).toEqual(Array(4).fill(t.segments.v1));
    expect(f.visits.flatMap((v) => [...v.newLesions, ...v.goneLesions, ...v.marginAlerts])).toEqual([]);
    // Tracks are lettered in order of first appearance; the target flag is said beside the id.
    expect(f.tracks.map((t) => [t.id, t.segments.v1, t.target])).toEqual([['A', 'V', true], ['B', 'VII', true], ['C', 'II', false]]);
  });

  it('DEMO-0002: HCC in VIII ablated (mRECIST CR, RECIST not), then a new lesion in VI (PD)', () => {
    const f = followup('DEMO-0002');
    expect(f.criteria).toBe('mRECIST');
    // No viable tumour after ablation: complete response by mRECIST at the second visit.
    expect(category(f)).toEqual([null, 'CR', 'PD', 'PD']);
    // The ablation zone is larger than the tumour was, so RECIST 1.1 (diameters) does not see the response.
    const recist = f.visits[1].otherResponses.find((r) => r.criteria === 'RECIST 1.1')!;
    expect(recist.category).not.toBe('CR');
    expect(recist.category).not.toBe('PR');
    const vi = trackIn(f, 'VI');
    expect(f.visits[2].newLesions).toEqual([vi.id]);
    expect(vi.segments.v1 ?? null).toBeNull();
    expect(vi.longestAxialMm.v4!).toBeGreaterThan(vi.longestAxialMm.v3!);
  });

  it('DEMO-0003: the lesion in VIII grows towards VII: margin alert from the second visit, PD at the third', () => {
    const f = followup('DEMO-0003');
    const viii = trackIn(f, 'VIII');
    // Beyond 10 mm from the border at baseline, inside it at the second visit, across it at the third.
    expect(f.visits.map((v) => v.marginAlerts)).toEqual([[], [viii.id], [viii.id]]);
    // Growth of 2 mm keeps the second visit stable; the third is over 20% and 5 mm above the nadir.
    expect(category(f)).toEqual([null, 'SD', 'PD']);
    const ivb = trackIn(f, 'IVb');
    expect(ivb.target).toBe(true);
    // Its size is unchanged by design; voxel-centre measurement moves it by at most one voxel (2.6 mm here).
    const sizes = Object.values(ivb.longestAxialMm) as number[];
    expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(2.6);
  });

  it('is generated the same from the seed every time', () => {
    const out = mkdtempSync(join(tmpdir(), 'falciform-demo-'));
    const r = spawnSync(process.execPath, ['build/demo-data/generate.js', out], { encoding: 'utf8' });
    expect(r.status).toBe(0);
    const files = (dir: string): string[] =>
      readdirSync(dir).flatMap((n) => (statSync(join(dir, n)).isDirectory() ? files(join(dir, n)) : [join(dir, n)]));
    const made = files(out).map((f) => relative(out, f)).sort();
    expect(made.length).toBeGreaterThan(40);
    for (const f of made) expect(readFileSync(join(out, f)).equals(readFileSync(join('demo-data', f))), f).toBe(true);
  });
});
