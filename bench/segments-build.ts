// Benchmark: building a segment map by the plane rule on a 512×512×300 liver mask held in memory.
// Run: npx tsc -p tsconfig.node.json && node build/bench/segments-build.js
import { performance } from 'node:perf_hooks';
import { buildSegmentMap } from '../src/segments/build.js';
import type { LandmarkSet } from '../src/segments/landmarks.js';
import { makeVolume } from '../src/volume/volume.js';

const dims = [512, 512, 300] as const;
const spacing = [0.75, 0.75, 1.0];
// A slightly oblique grid centred on the world origin, like a tilted abdominal CT.
const c = Math.cos(0.1), s = Math.sin(0.1);
const affine = [
  spacing[0] * c, -spacing[1] * s, 0, -(spacing[0] * c * 255.5 - spacing[1] * s * 255.5),
  spacing[0] * s, spacing[1] * c, 0, -(spacing[0] * s * 255.5 + spacing[1] * c * 255.5),
  0, 0, spacing[2], -spacing[2] * 149.5,
  0, 0, 0, 1,
];

// Ellipsoid liver of about 2.5 L right of the midline (RAS: right is +x).
const centre = [40, 10, 0], semi = [110, 85, 75];
const mask = new Uint8Array(dims[0] * dims[1] * dims[2]);
let n = 0;
let liverVoxels = 0;
for (let k = 0; k < dims[2]; k++) {
  for (let j = 0; j < dims[1]; j++) {
    for (let i = 0; i < dims[0]; i++, n++) {
      const x = (affine[0] * i + affine[1] * j + affine[3] - centre[0]) / semi[0];
      const y = (affine[4] * i + affine[5] * j + affine[7] - centre[1]) / semi[1];
      const z = (affine[10] * k + affine[11] - centre[2]) / semi[2];
      if (x * x + y * y + z * z <= 1) {
        mask[n] = 1;
        liverVoxels++;
      }
    }
  }
}
const liver = makeVolume(dims, mask, affine, 'uint8');
const landmarks: LandmarkSet = {
  points: {
    ivc_superior: [25, -40, 45],
    ivc_inferior: [22, -45, -40],
    right_hepatic_vein: [100, -15, 40],
    middle_hepatic_vein: [35, 20, 40],
    umbilical_fissure: [-15, 30, 10],
    portal_bifurcation: [20, -5, 0],
  },
};

const voxels = dims[0] * dims[1] * dims[2];
const times: number[] = [];
for (let run = 0; run < 4; run++) {
  const t0 = performance.now();
  buildSegmentMap(liver, landmarks, { splitIV: true });
  times.push(performance.now() - t0);
}
// The first run includes compilation by the JIT; report the best of the rest and the first.
const best = Math.min(...times.slice(1));
console.log(
  `segments build ${dims.join('×')} (${(voxels / 1e6).toFixed(1)} Mvoxel, liver ${((liverVoxels / voxels) * 100).toFixed(1)} %): ` +
    `${best.toFixed(0)} ms (${(voxels / 1e3 / best).toFixed(0)} Mvoxel/s), first run ${times[0].toFixed(0)} ms`,
);
