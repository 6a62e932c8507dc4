// npm run bench: every benchmark script in bench/ (compiled to build/bench/), one after another.
// Each prints its own figures; the NIfTI, segment and visit benchmarks run their nibabel/SciPy peers too.
import { spawnSync } from 'node:child_process';

const benches = ['nifti-load', 'segments-build', 'analyze-visit', 'match', 'fuzz'];
const build = spawnSync('npx', ['tsc', '-p', 'tsconfig.node.json'], { stdio: 'inherit' });
if (build.status !== 0) process.exit(build.status ?? 1);
let failed = 0;
for (const name of benches) {
  console.log(`\n== bench/${name}`);
  const r = spawnSync(process.execPath, [`build/bench/${name}.js`], { stdio: 'inherit' });
  if (r.status !== 0) failed++;
}
process.exitCode = failed ? 1 : 0;
