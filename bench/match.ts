// Benchmark: lesion matching across two visits of many lesions (issue: a probe's 6,400-lesion visits
// ran past 5 minutes). Lesions of 2–15 mm spread through a 200×160×160 mm box; the second visit moves
// each by up to 4 mm, drops 5% and adds 5% new ones. Prints the time of buildTracks and of the gated
// assignment alone, the largest gated block, and SciPy's linear_sum_assignment (the outside peer) on
// the same padded cost matrix, whose total must equal ours. Asserts nothing but the agreement.
// Run: npx tsc -p tsconfig.node.json && node build/bench/match.js [lesions per visit, default 1000]
import { spawnSync } from 'node:child_process';
import { writeFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { assignWithGate } from '../src/followup/hungarian.js';
import { buildTracks, gateMm, type TrackLesion } from '../src/followup/tracks.js';

type Vec3 = readonly [number, number, number];
const count = Number(process.argv[2] ?? 1000);
let seed = 20261202;
const random = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
const box: Vec3 = [200, 160, 160];
const v1: TrackLesion[] = [];
for (let n = 0; n < count; n++) {
  v1.push({ id: `L${n + 1}`, centreMm: [random() * box[0], random() * box[1], random() * box[2]], longestAxialMm: 2 + 13 * random() });
}
const v2: TrackLesion[] = [];
for (const l of v1) {
  if (random() < 0.05) continue;
  const c: Vec3 = [l.centreMm[0] + (random() - 0.5) * 8, l.centreMm[1] + (random() - 0.5) * 8, l.centreMm[2] + (random() - 0.5) * 8];
  v2.push({ id: `L${v2.length + 1}`, centreMm: c, longestAxialMm: l.longestAxialMm * (0.8 + 0.4 * random()) });
}
while (v2.length < count) {
  v2.push({ id: `L${v2.length + 1}`, centreMm: [random() * box[0], random() * box[1], random() * box[2]], longestAxialMm: 2 + 13 * random() });
}

const t0 = performance.now();
const tracking = buildTracks([{ id: 'v1', lesions: v1, slackMm: 0 }, { id: 'v2', lesions: v2, slackMm: 2 }]);
const tracksMs = performance.now() - t0;

// The assignment alone, on the cost matrix the matcher builds (tracks at v1 are the v1 lesions).
const dist = (a: Vec3, b: Vec3) => Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
const cost = v2.map((l) => v1.map((r) => {
  const g = gateMm(l.longestAxialMm, r.longestAxialMm, 2);
  const d = dist(l.centreMm, r.centreMm);
  return d <= g ? d / g : Infinity;
}));
const t1 = performance.now();
const pairs = assignWithGate(cost, 0.5);
const assignMs = performance.now() - t1;
const ours = pairs.reduce((s, [r, c]) => s + cost[r][c], 0) + 0.5 * (v2.length + v1.length - 2 * pairs.length);
const finite = cost.reduce((s, row) => s + row.filter(Number.isFinite).length, 0);
console.log(`match: ${v1.length} + ${v2.length} lesions, ${finite} gated candidate pairs, Node ${process.version}`);
console.log(`  buildTracks (two visits): ${tracksMs.toFixed(0)} ms, ${tracking.tracks.length} tracks`);
console.log(`  gated assignment alone:   ${assignMs.toFixed(0)} ms, ${pairs.length} pairs, total cost ${ours.toFixed(6)}`);

// SciPy on the same problem: the rows and columns may each stay unpaired at 0.5.
const dir = mkdtempSync(join(tmpdir(), 'falciform-match-'));
try {
  const file = join(dir, 'cost.json');
  writeFileSync(file, JSON.stringify(cost.map((row) => row.map((c) => (Number.isFinite(c) ? c : -1)))));
  const py = `
import json, sys, time, numpy as np
from scipy.optimize import linear_sum_assignment
c = np.array(json.load(open(sys.argv[1])), dtype=float)
n, m = c.shape
big = 1e6
sq = np.full((n + m, n + m), big)
real = np.where(c < 0, big, c)
sq[:n, :m] = real
sq[np.arange(n), m + np.arange(n)] = 0.5
sq[n + np.arange(m), np.arange(m)] = 0.5
sq[n:, m:] = 0
t = time.perf_counter()
r, k = linear_sum_assignment(sq)
ms = (time.perf_counter() - t) * 1000
print(f"{ms:.0f} {sq[r, k].sum():.6f}")
`;
  const r = spawnSync('/usr/bin/python3', ['-c', py, file], { encoding: 'utf8' });
  if (r.status !== 0) console.log(`  SciPy peer failed: ${r.stderr.trim().split('\n').pop()}`);
  else {
    const [ms, total] = r.stdout.trim().split(' ');
    console.log(`  SciPy linear_sum_assignment on the padded ${v1.length + v2.length}² matrix: ${ms} ms, total cost ${total}`);
    const agree = Math.abs(Number(total) - ours) < 1e-6;
    console.log(`  totals ${agree ? 'agree' : 'DIFFER'}`);
    if (!agree) process.exitCode = 1;
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
