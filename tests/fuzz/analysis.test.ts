// Fuzzing the analysis stage, sized for every test run: a few cases of each hostile-content class
// (bench/fuzz-analysis-cases.ts) on a 32×32×16 grid through `falciform analyze` and `followup` as
// child processes. The long run with 128×128×64 grids and 512×512×300 bombs is bench/fuzz-analysis.ts.
// The rule: exit 0 with the result the mask holds by construction (analytic counts and volumes, the
// tangent chord of a ring), or exit 3 with one short line; within 5 s of CPU and the memory aim.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLASSES, judge, restingRss, runCli, writeCases, type AnalysisCase } from '../../bench/fuzz-analysis-cases.js';

const cli = join(process.cwd(), 'bin/falciform.js');
const dir = mkdtempSync(join(tmpdir(), 'falciform-fuzz-analysis-'));
// A few of each class: the ones that reach the most code (refusal and result, analyze and followup).
const PICK = [
  /^analyze every voxel set$/, /^followup every voxel set twice$/,
  /^analyze one voxel in eight \(2048 lesions\)$/, /--max-lesions 5000$/, /^followup one voxel in eight twice/,
  /one-voxel lesions, default cap$/, /^followup 1000 then 1000 one-voxel lesions$/,
  /^analyze scan NaN slope$/, /^analyze lesion mask NaN slope$/, /^analyze segment map infinite slope$/, /^analyze lesion mask slope -1$/,
  /^analyze every input mirrored in x$/, /^analyze lesion mask: singular sform/, /^analyze scan: NaN in the sform/,
  /10 m from the scan$/, /^followup viable rim/,
];
let cases: AnalysisCase[] = [];
let resting = 0;

beforeAll(async () => {
  cases = writeCases(dir, 'small').filter((c) => PICK.some((p) => p.test(c.name)));
  resting = await restingRss(cli);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('hostile content through analyze and followup (32×32×16 grid)', () => {
  it('the selection covers every class', () => {
    expect(new Set(cases.map((c) => c.cls))).toEqual(new Set(CLASSES));
    expect(cases.length).toBe(17);
  });

  for (const cls of CLASSES) {
    it(`${cls}: each case ends in a correct result or one line with exit 3, within budget`, async () => {
      for (const c of cases.filter((x) => x.cls === cls)) {
        const r = await runCli(cli, c);
        expect(judge(c, r, resting), `${c.name} (exit ${r.status}, ${r.cpuSeconds.toFixed(2)} s CPU)`).toBeNull();
      }
    });
  }

  it('a lattice of 2048 one-voxel lesions is refused at the default cap of 1000, naming the file and the count', async () => {
    const c = cases.find((x) => x.name === 'analyze one voxel in eight (2048 lesions)')!;
    const r = await runCli(cli, c);
    expect(r.status).toBe(3);
    expect(r.stderr).toBe(`falciform analyze: ${join(dir, 'lattice.nii.gz')}: holds 2048 lesions (26-connected components), above the cap of 1000 lesions per visit\n`);
  });

  it('a segment map 10 m from the scan is refused with exit 3 naming the map', async () => {
    const c = cases.find((x) => x.name === 'analyze segment map 10 m from the scan')!;
    const r = await runCli(cli, c);
    expect(r.status).toBe(3);
    expect(r.stderr).toContain(join(dir, 'segments-far.nii.gz'));
  });
});
