import { transformPoint, type Vec3 } from '../geometry/mat4.js';
import { tooLarge } from '../errors.js';
import type { Volume } from '../volume/volume.js';
import type { LesionVoxels } from './components.js';
import { axialFrame, voxelCoords } from './measures.js';

/** The longest axial segment inside a region. */
export interface InsideDiameter {
  lengthMm: number;
  /** Ends of the segment, world mm; null for an empty region. */
  endpointsMm: [Vec3, Vec3] | null;
}

/**
 * Longest axial diameter that stays inside a region: the longest straight segment within one axial
 * slice, over all slices, whose ends are voxel centres of the region and whose line does not leave
 * it. mRECIST measures viable tumour this way (Lencioni and Llovet, Semin Liver Dis 2010;30:52-60;
 * "the longest viable tumor diameter", which does not cross necrosis, from memory): the enhancing rim
 * of a lesion with a necrotic centre is not as wide as the lesion. On a convex region it equals the
 * longest axial diameter; across a ring of radii r < R it is the chord tangent to the inner circle,
 * 2·√(R² − r²).
 *
 * Voxel-grid tolerance: the line is sampled at least every half voxel along the slice's grid axes and
 * each sample's nearest voxel must belong to the region, so the segment may clip the corner of a voxel
 * outside by at most a quarter voxel, and a one-voxel diagonal chain counts as continuous. Ends are
 * boundary voxels of the slice (a voxel with an in-plane edge neighbour outside), since a longest
 * segment cannot end where it could be extended. Because the ends are voxel centres inside the region,
 * a segment that meets the edge obliquely falls short of the continuous length by up to about one
 * voxel at each end; the clipped corners lengthen it by less than a voxel.
 *
 * Cost: slices are taken widest first, so that the best found early rules out the narrower ones; a
 * slice identical to the one measured just before it is skipped (an extruded region costs one slice).
 * In each remaining slice every pair of boundary voxels longer than the best is tested (an 8 cm shell
 * on 0.7 mm voxels and 2.5 mm slices takes about half a second, some 4 million pairs). The pairs are
 * counted and a region needing more than `MAX_PAIR_TESTS` is refused with a too-large error naming
 * `file`, so a thin rim the size of the field of view cannot hold the run for minutes.
 */
export function longestInsideAxial(mask: Volume, region: LesionVoxels, file = 'viable mask'): InsideDiameter {
  const count = region.voxels.length;
  if (count === 0) return { lengthMm: 0, endpointsMm: null };
  const coords = voxelCoords(mask.dims, region.voxels);
  const { ax, a0, a1, alpha, beta, gamma } = axialFrame(mask.affine);

  let cMin = Infinity, cMax = -Infinity;
  for (let t = 0; t < count; t++) {
    const c = coords[3 * t + ax];
    if (c < cMin) cMin = c;
    if (c > cMax) cMax = c;
  }
  // Counting sort of the voxels by slice.
  const slices = cMax - cMin + 1;
  const start = new Uint32Array(slices + 1);
  for (let t = 0; t < count; t++) start[coords[3 * t + ax] - cMin + 1]++;
  for (let s = 0; s < slices; s++) start[s + 1] += start[s];
  const bySlice = new Uint32Array(count);
  const fill = start.slice(0, slices);
  for (let t = 0; t < count; t++) bySlice[fill[coords[3 * t + ax] - cMin]++] = t;

  // Each slice's bounding box and the square of its diagonal in mm, an upper bound on its segments.
  const boxes = new Int32Array(4 * slices);
  const diag2 = new Float64Array(slices).fill(-1);
  for (let s = 0; s < slices; s++) {
    if (start[s] === start[s + 1]) continue;
    let pMin = Infinity, pMax = -Infinity, qMin = Infinity, qMax = -Infinity;
    for (let u = start[s]; u < start[s + 1]; u++) {
      const t = bySlice[u];
      const p = coords[3 * t + a0], q = coords[3 * t + a1];
      if (p < pMin) pMin = p;
      if (p > pMax) pMax = p;
      if (q < qMin) qMin = q;
      if (q > qMax) qMax = q;
    }
    boxes.set([pMin, pMax, qMin, qMax], 4 * s);
    const boxX = (pMax - pMin) * alpha + Math.abs(qMax - qMin) * Math.abs(beta);
    const boxY = (qMax - qMin) * gamma;
    diag2[s] = boxX * boxX + boxY * boxY;
  }
  // Widest first; equal boxes keep slice order, so ties resolve as a bottom-up pass would.
  const order = Array.from({ length: slices }, (_, s) => s).filter((s) => diag2[s] >= 0).sort((x, y) => diag2[y] - diag2[x] || x - y);

  let best = -1;
  let bestSlice = 0, e1p = 0, e1q = 0, e2p = 0, e2q = 0;
  let pairTests = 0;
  let previous: { bits: Uint8Array; w: number } | null = null;
  for (const s of order) {
    const pMin = boxes[4 * s], pMax = boxes[4 * s + 1], qMin = boxes[4 * s + 2], qMax = boxes[4 * s + 3];
    // No segment in this slice can beat the best: its bounding box's diagonal is too short.
    if (best >= 0 && diag2[s] <= best) continue;

    // The slice as a bitmap with a one-voxel empty border.
    const w = pMax - pMin + 3, h = qMax - qMin + 3;
    const bits = new Uint8Array(w * h);
    for (let u = start[s]; u < start[s + 1]; u++) {
      const t = bySlice[u];
      bits[coords[3 * t + a0] - pMin + 1 + w * (coords[3 * t + a1] - qMin + 1)] = 1;
    }
    // The same shape as the slice just measured (same box size, same pixels): the same best.
    if (previous !== null && previous.w === w && sameBytes(previous.bits, bits)) continue;
    previous = { bits, w };
    const edgeP: number[] = [], edgeQ: number[] = [];
    for (let y = 1; y < h - 1; y++) {
      for (let x = 1; x < w - 1; x++) {
        const n = x + w * y;
        if (bits[n] && (!bits[n - 1] || !bits[n + 1] || !bits[n - w] || !bits[n + w])) {
          edgeP.push(x);
          edgeQ.push(y);
        }
      }
    }
    const m = edgeP.length;
    const ex = new Float64Array(m), ey = new Float64Array(m);
    for (let a = 0; a < m; a++) {
      ex[a] = edgeP[a] * alpha + edgeQ[a] * beta;
      ey[a] = edgeQ[a] * gamma;
    }
    if (best < 0) best = 0;
    pairTests += (m * (m - 1)) / 2;
    if (pairTests > MAX_PAIR_TESTS) {
      throw tooLarge(file, `a component of ${count} voxels would need more than ${MAX_PAIR_TESTS.toExponential(0)} voxel-pair tests to measure its inside diameter (a slice rim of ${m} boundary voxels): too large to measure in bounded time`);
    }
    for (let a = 0; a < m; a++) {
      for (let b = a + 1; b < m; b++) {
        const d2 = (ex[a] - ex[b]) ** 2 + (ey[a] - ey[b]) ** 2;
        // Ties keep the first pair found, so the result does not depend on floating noise.
        if (d2 <= best * (1 + 1e-12) + 1e-12) continue;
        if (!lineInside(bits, w, edgeP[a], edgeQ[a], edgeP[b], edgeQ[b])) continue;
        best = d2;
        bestSlice = s + cMin;
        e1p = edgeP[a] + pMin - 1;
        e1q = edgeQ[a] + qMin - 1;
        e2p = edgeP[b] + pMin - 1;
        e2q = edgeQ[b] + qMin - 1;
      }
    }
  }
  const toWorld = (p: number, q: number): Vec3 => {
    const ijk: [number, number, number] = [0, 0, 0];
    ijk[a0] = p;
    ijk[a1] = q;
    ijk[ax] = bestSlice;
    return transformPoint(mask.affine, ijk);
  };
  if (best <= 0) {
    // One voxel per slice: a point.
    const t = bySlice[0];
    bestSlice = coords[3 * t + ax];
    const p = toWorld(coords[3 * t + a0], coords[3 * t + a1]);
    return { lengthMm: 0, endpointsMm: [p, p] };
  }
  return { lengthMm: Math.sqrt(best), endpointsMm: [toWorld(e1p, e1q), toWorld(e2p, e2q)] };
}

/** Voxel pairs one region may cost: about ten times the 8 cm shell above, some seconds of work. */
export const MAX_PAIR_TESTS = 5e7;

function sameBytes(a: Uint8Array, b: Uint8Array): boolean {
  if (a.length !== b.length) return false;
  for (let k = 0; k < a.length; k++) if (a[k] !== b[k]) return false;
  return true;
}

/**
 * Whether the segment between two set pixels stays on set pixels, sampled at least every half pixel.
 * A sample on the edge between two pixels (exactly half-way) passes when either is set: it lies on the
 * closed square of a set pixel. Integer arithmetic keeps those ties exact. Samples are taken coarse to
 * fine (the middle, then the quarters, …), so a line across a gap fails after a few looks.
 */
function lineInside(bits: Uint8Array, w: number, x0: number, y0: number, x1: number, y1: number): boolean {
  const dx = x1 - x0, dy = y1 - y0;
  const steps = 2 * Math.max(Math.abs(dx), Math.abs(dy));
  let stride = 1;
  while (stride * 2 < steps) stride *= 2;
  for (; stride >= 1; stride >>= 1) {
    for (let k = stride; k < steps; k += 2 * stride) {
      // Sample at (x0 + dx·k/steps, y0 + dy·k/steps); coordinates are positive (bitmap border).
      const nx = x0 * steps + dx * k, ny = y0 * steps + dy * k;
      const fx = Math.floor(nx / steps), rx = nx - fx * steps;
      const fy = Math.floor(ny / steps), ry = ny - fy * steps;
      const xa = 2 * rx > steps ? fx + 1 : fx, xb = 2 * rx >= steps ? fx + 1 : fx;
      const ya = 2 * ry > steps ? fy + 1 : fy, yb = 2 * ry >= steps ? fy + 1 : fy;
      if (!bits[xa + w * ya] && !bits[xb + w * ya] && !bits[xa + w * yb] && !bits[xb + w * yb]) return false;
    }
  }
  return true;
}
