// npm run bench: every benchmark script in bench/ (compiled to build/bench/), one after another.
// Each prints its own figures; the NIfTI, segment and visit benchmarks run their nibabel/SciPy peers too.
// The app benchmarks drive Debian's Chromium on the built renderer.
import { spawnSync } from 'node:child_process';
import { availableParallelism } from 'node:os';

const benches = ['nifti-load', 'segments-build', 'analyze-visit', 'fuzz', 'fuzz-analysis', 'batch', 'dicom-read', 'grow-liver', 'app-viewer', 'followup-long', 'match'];
const build = spawnSync('npx', ['tsc', '-p', 'tsconfig.node.json'], { stdio: 'inherit' });
if (build.status !== 0) process.exit(build.status ?? 1);
const renderer = spawnSync('npx', ['vite', 'build', '--logLevel', 'warn'], { stdio: 'inherit' });
if (renderer.status !== 0) process.exit(renderer.status ?? 1);
console.log(`all figures below on this machine: ${availableParallelism()} cores, node ${process.version}`);
let failed = 0;
for (const name of benches) {
  console.log(`\n== bench/${name}`);
  const r = spawnSync(process.execPath, [`build/bench/${name}.js`], { stdio: 'inherit' });
  if (r.status !== 0) failed++;
}
process.exitCode = failed ? 1 : 0;
