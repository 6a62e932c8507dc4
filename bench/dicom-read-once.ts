// One read of a DICOM folder, in its own process so bench/dicom-read.ts can take its peak memory.
// Prints one JSON line: seconds, voxel bytes, peak resident bytes.
import { performance } from 'node:perf_hooks';
import { loadDicom } from '../src/cli/dicom-io.js';

const t0 = performance.now();
const loaded = await loadDicom(process.argv[2]);
const seconds = (performance.now() - t0) / 1000;
console.log(JSON.stringify({ seconds, volumeBytes: loaded.volume.data.byteLength, peakBytes: process.resourceUsage().maxRSS * 1024, dims: loaded.volume.dims }));
