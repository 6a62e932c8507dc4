import type { Vec3 } from '../../src/geometry/mat4.js';
import { distance } from '../../src/geometry/vec3.js';
import type { Mark } from '../../src/lesions/marks.js';
import { roundTo } from '../../src/rounding.js';

/** Calipers are stored to 0.1 mm: finer than any scan's voxels, and the file stays readable. */
const tenth = (x: number) => roundTo(x, 1);

/**
 * A manual mark from a caliper across the lesion's longest axial diameter: centre halfway between
 * the ends, the longest diameter their distance (after rounding, so the file agrees with itself),
 * the short axis capped at the longest as RECIST's definitions imply.
 */
export function markFromCaliper(id: string, a: Vec3, b: Vec3, shortAxisMm: number, viableAxialMm?: number): Mark {
  const ea: Vec3 = [tenth(a[0]), tenth(a[1]), tenth(a[2])];
  const eb: Vec3 = [tenth(b[0]), tenth(b[1]), tenth(b[2])];
  const longestAxialMm = tenth(distance(ea, eb));
  const mark: Mark = {
    id,
    centreMm: [tenth((ea[0] + eb[0]) / 2), tenth((ea[1] + eb[1]) / 2), tenth((ea[2] + eb[2]) / 2)],
    longestAxialMm,
    shortAxisMm: Math.min(longestAxialMm, tenth(Math.max(0, shortAxisMm))),
    endpointsMm: [ea, eb],
  };
  if (viableAxialMm !== undefined) mark.viableAxialMm = Math.min(longestAxialMm, viableAxialMm);
  return mark;
}

/** Unit vector across the long axis in the axial plane; null when the axis has no axial extent. */
function across(a: Vec3, b: Vec3): Vec3 | null {
  const dx = b[0] - a[0], dy = b[1] - a[1];
  const len = Math.hypot(dx, dy);
  return len < 1e-9 ? null : [-dy / len, dx / len, 0];
}

/** The short axis a second drag (p to q) measures: its extent across the long axis a–b, in the axial plane. */
export function shortAxisOfDrag(a: Vec3, b: Vec3, p: Vec3, q: Vec3): number {
  const n = across(a, b);
  if (!n) return 0;
  return Math.abs((q[0] - p[0]) * n[0] + (q[1] - p[1]) * n[1]);
}

/** Ends of the short-axis caliper as drawn: through the centre, across the long axis. */
export function shortAxisEnds(mark: Mark): [Vec3, Vec3] | null {
  if (!mark.endpointsMm) return null;
  const n = across(mark.endpointsMm[0], mark.endpointsMm[1]);
  if (!n) return null;
  const h = mark.shortAxisMm / 2;
  const c = mark.centreMm;
  return [[c[0] - n[0] * h, c[1] - n[1] * h, c[2]], [c[0] + n[0] * h, c[1] + n[1] * h, c[2]]];
}

/** The next free mark id M1, M2, … (never one a mask lesion or another mark holds). */
export function nextMarkId(taken: Iterable<string>): string {
  let max = 0;
  const used = new Set(taken);
  for (const id of used) {
    const m = /^M(\d+)$/.exec(id);
    if (m) max = Math.max(max, Number(m[1]));
  }
  let n = max + 1;
  while (used.has(`M${n}`)) n++;
  return `M${n}`;
}

/** A mark as the marks file writes it (contracts, "Manual marks"). */
export function markJson(mark: Mark): { id: string; centreMm: number[]; longestAxialMm: number; shortAxisMm: number; endpointsMm?: number[][]; viableAxialMm?: number } {
  return {
    id: mark.id,
    centreMm: [...mark.centreMm],
    longestAxialMm: mark.longestAxialMm,
    shortAxisMm: mark.shortAxisMm,
    ...(mark.endpointsMm ? { endpointsMm: mark.endpointsMm.map((p) => [...p]) } : {}),
    ...(mark.viableAxialMm !== undefined ? { viableAxialMm: mark.viableAxialMm } : {}),
  };
}
