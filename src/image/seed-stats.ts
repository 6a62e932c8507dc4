import type { Dims } from './box.js';

/**
 * Median and robust spread (1.4826 × median absolute deviation, which equals the standard deviation
 * for Gaussian noise) of the values in balls of `radiusMm` around the seed voxels (i, j, k),
 * optionally only where `within` is non-zero.
 */
export function ballStats(
  values: ArrayLike<number>,
  dims: Dims,
  spacingMm: readonly number[],
  seeds: readonly (readonly [number, number, number])[],
  radiusMm: number,
  within?: Uint8Array,
): { median: number; spread: number; count: number } {
  const [nx, ny, nz] = dims;
  const picked: number[] = [];
  const r2 = radiusMm * radiusMm;
  for (const [si, sj, sk] of seeds) {
    const hi = Math.floor(radiusMm / spacingMm[0]), hj = Math.floor(radiusMm / spacingMm[1]), hk = Math.floor(radiusMm / spacingMm[2]);
    for (let k = Math.max(0, sk - hk); k <= Math.min(nz - 1, sk + hk); k++) {
      for (let j = Math.max(0, sj - hj); j <= Math.min(ny - 1, sj + hj); j++) {
        for (let i = Math.max(0, si - hi); i <= Math.min(nx - 1, si + hi); i++) {
          const d2 = ((i - si) * spacingMm[0]) ** 2 + ((j - sj) * spacingMm[1]) ** 2 + ((k - sk) * spacingMm[2]) ** 2;
          const n = i + nx * (j + ny * k);
          if (d2 <= r2 && (within === undefined || within[n] !== 0)) picked.push(values[n]);
        }
      }
    }
  }
  if (picked.length === 0) return { median: NaN, spread: NaN, count: 0 };
  const median = medianOf(picked);
  const spread = 1.4826 * medianOf(picked.map((v) => Math.abs(v - median)));
  return { median, spread, count: picked.length };
}

function medianOf(xs: number[]): number {
  const s = Float64Array.from(xs).sort();
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}
