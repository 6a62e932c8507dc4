// Fuzzing the analysis stage (bench/fuzz-analysis-cases.ts): every class of hostile but valid input
// through `falciform analyze` and `followup` as child processes, on a small grid, a 128×128×64 grid
// and 512×512×300 bombs. Prints per class and size: cases, exit statuses, the slowest case and the
// peak memory; flags each case over its time or memory budget or with a wrong result; exits 1 if any.
// Run: npx tsc -p tsconfig.node.json && node build/bench/fuzz-analysis.js [small] [bench] [bomb]
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import {
  CLASSES, judge, mib, MEMORY_RATIO, WALL_FACTOR, WORKING_SET_BYTES, restingRss, runCli, writeCases, type CaseClass, type CliRun, type Size,
} from './fuzz-analysis-cases.js';

const sizes = (process.argv.length > 2 ? process.argv.slice(2) : ['small', 'bench', 'bomb']) as Size[];
if (sizes.some((s) => !['small', 'bench', 'bomb'].includes(s))) {
  console.error('usage: node build/bench/fuzz-analysis.js [small] [bench] [bomb]');
  process.exit(2);
}
// A bomb of every class would take many minutes to write; these hold the classes whose cost grows
// with the content, not the header.
const BOMB_CLASSES: CaseClass[] = ['all-set', 'lattice', 'one-voxel', 'ring'];

const cli = join(process.cwd(), 'bin/falciform.js');
const resting = await restingRss(cli);
console.log(`fuzz-analysis: budgets in CPU seconds (wall within ${WALL_FACTOR}× that); memory aim ${MEMORY_RATIO}× decompressed inputs `
  + `above the CLI at rest (${mib(resting)} MiB) and a ${mib(WORKING_SET_BYTES)} MiB working set; Node ${process.version}`);
let failures = 0;
for (const size of sizes) {
  const dir = mkdtempSync(join(tmpdir(), `falciform-fuzz-${size}-`));
  try {
    const cases = writeCases(dir, size, size === 'bomb' ? BOMB_CLASSES : CLASSES);
    for (const cls of CLASSES) {
      const mine = cases.filter((c) => c.cls === cls);
      if (mine.length === 0) continue;
      const exits = new Map<string, number>();
      let slowest = { cpu: 0, wall: 0, name: '' };
      let peak = 0, inputs = 0;
      const bad: string[] = [];
      for (const c of mine) {
        const r: CliRun = await runCli(cli, c);
        const key = `exit ${r.status ?? 'killed'}`;
        exits.set(key, (exits.get(key) ?? 0) + 1);
        if (r.cpuSeconds > slowest.cpu) slowest = { cpu: r.cpuSeconds, wall: r.seconds, name: c.name };
        if (r.peakRssBytes > peak) { peak = r.peakRssBytes; inputs = c.inputBytes; }
        const broke = judge(c, r, resting);
        if (broke) bad.push(`${c.name}: ${broke}`);
      }
      const statuses = [...exits].map(([k, n]) => `${n}× ${k}`).join(', ');
      console.log(`${size.padEnd(5)} ${cls.padEnd(10)} ${mine.length} cases (${statuses}); slowest ${slowest.cpu.toFixed(2)} s CPU, ${slowest.wall.toFixed(2)} s wall (${slowest.name}); peak ${mib(peak)} MiB for ${mib(inputs)} MiB of inputs`);
      for (const b of bad) console.log(`  OVER BUDGET OR WRONG: ${b}`);
      failures += bad.length;
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
console.log(failures ? `${failures} case(s) broke the rule` : 'every case ended within its budget');
process.exitCode = failures ? 1 : 0;
