// An invented upper-abdomen phantom for the liver and lesion growers, used by tests/image and
// bench/grow-liver. Every shape, position and value here is invented for this project; the values
// are of the order of a portal-venous CT (liver about 105 HU, enhanced vessels and kidney cortex
// brighter, a hypodense metastasis darker, common practice), not taken from any scan.

export type V3 = [number, number, number];

/** Invented values in HU. */
export const HU = {
  air: -1000,
  fat: -100,
  liver: 105,
  spleen: 112,
  bridge: 108,
  kidney: 170,
  vessel: 175,
  aorta: 170,
  lesion: 71, // 34 HU below the liver
  noiseSd: 15,
};

/** Invented geometry in world mm (RAS, origin near the grid centre). */
export const SHAPES = {
  liverRight: { c: [55, 0, 20] as V3, r: [65, 60, 52] as V3 },
  liverLeft: { c: [-10, 18, 35] as V3, r: [45, 32, 24] as V3 },
  spleen: { c: [-98, -22, 30] as V3, r: [20, 38, 42] as V3 },
  // A 6 mm thick bridge of similar density from the left lobe's tip to the spleen.
  bridge: { a: [-48, 8, 34] as V3, b: [-84, -10, 30] as V3, radius: 3 },
  kidney: { c: [72, -52, -38] as V3, r: [24, 20, 48] as V3 },
  aorta: { a: [-18, -48, -100] as V3, b: [-18, -48, 100] as V3, radius: 11 },
  // Enhanced vessels that branch inside the liver and end before its surface.
  vessels: [
    { a: [20, 5, 20] as V3, b: [85, 10, 40] as V3, radius: 4 },
    { a: [20, 5, 20] as V3, b: [60, -25, -10] as V3, radius: 3.5 },
    { a: [20, 5, 20] as V3, b: [-20, 20, 38] as V3, radius: 3 },
  ],
  lesion: { c: [62, 22, 2] as V3, radius: 7.5 }, // 15 mm across
  body: { c: [0, 0] as [number, number], r: [150, 118] as [number, number] },
};

export interface Phantom {
  dims: V3;
  affine: number[];
  scan: Int16Array;
  liver: Uint8Array;
  lesion: Uint8Array;
  liverSeedMm: V3;
  lesionSeedMm: V3;
  spleenMm: V3;
}

const inEllipsoid = (x: number, y: number, z: number, e: { c: V3; r: V3 }) =>
  ((x - e.c[0]) / e.r[0]) ** 2 + ((y - e.c[1]) / e.r[1]) ** 2 + ((z - e.c[2]) / e.r[2]) ** 2 <= 1;

function inCapsule(x: number, y: number, z: number, s: { a: V3; b: V3; radius: number }): boolean {
  const d = [s.b[0] - s.a[0], s.b[1] - s.a[1], s.b[2] - s.a[2]];
  const w = [x - s.a[0], y - s.a[1], z - s.a[2]];
  const t = Math.max(0, Math.min(1, (w[0] * d[0] + w[1] * d[1] + w[2] * d[2]) / (d[0] ** 2 + d[1] ** 2 + d[2] ** 2)));
  return (w[0] - t * d[0]) ** 2 + (w[1] - t * d[1]) ** 2 + (w[2] - t * d[2]) ** 2 <= s.radius ** 2;
}

/**
 * The phantom on an axis-aligned grid as a scanner's NIfTI has it (i towards patient left, j towards
 * posterior), centred on the world origin, with Gaussian noise from a fixed seed.
 */
export function makePhantom(dims: V3, spacingMm: V3, seed = 1): Phantom {
  const [nx, ny, nz] = dims;
  const [sx, sy, sz] = spacingMm;
  const affine = [-sx, 0, 0, (sx * (nx - 1)) / 2, 0, -sy, 0, (sy * (ny - 1)) / 2, 0, 0, sz, (-sz * (nz - 1)) / 2, 0, 0, 0, 1];
  const n = nx * ny * nz;
  const scan = new Int16Array(n);
  const liver = new Uint8Array(n);
  const lesion = new Uint8Array(n);
  let s = seed >>> 0;
  const uniform = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return (s + 0.5) / 2 ** 32;
  };
  let spare = NaN;
  const gauss = () => {
    if (!Number.isNaN(spare)) {
      const g = spare;
      spare = NaN;
      return g;
    }
    const r = Math.sqrt(-2 * Math.log(uniform())), a = 2 * Math.PI * uniform();
    spare = r * Math.sin(a);
    return r * Math.cos(a);
  };
  const S = SHAPES;
  let v = 0;
  for (let k = 0; k < nz; k++) {
    const z = affine[10] * k + affine[11];
    for (let j = 0; j < ny; j++) {
      const y = affine[5] * j + affine[7];
      for (let i = 0; i < nx; i++, v++) {
        const x = affine[0] * i + affine[3];
        let hu: number = HU.air;
        if (((x - S.body.c[0]) / S.body.r[0]) ** 2 + ((y - S.body.c[1]) / S.body.r[1]) ** 2 <= 1) {
          hu = HU.fat;
          // Cheap box test first: everything but the body lies within |x| < 125, |y| < 80.
          if (Math.abs(x) < 125 && Math.abs(y) < 80) {
            if (inEllipsoid(x, y, z, S.liverRight) || inEllipsoid(x, y, z, S.liverLeft)) {
              liver[v] = 1;
              hu = HU.liver;
              if (S.vessels.some((c) => inCapsule(x, y, z, c))) hu = HU.vessel;
              if ((x - S.lesion.c[0]) ** 2 + (y - S.lesion.c[1]) ** 2 + (z - S.lesion.c[2]) ** 2 <= S.lesion.radius ** 2) {
                lesion[v] = 1;
                hu = HU.lesion;
              }
            } else if (inEllipsoid(x, y, z, S.kidney)) hu = HU.kidney;
            else if (inEllipsoid(x, y, z, S.spleen)) hu = HU.spleen;
            else if (inCapsule(x, y, z, S.bridge)) hu = HU.bridge;
            else if (inCapsule(x, y, z, S.aorta)) hu = HU.aorta;
          }
        }
        scan[v] = Math.round(hu + HU.noiseSd * gauss());
      }
    }
  }
  return {
    dims, affine, scan, liver, lesion,
    liverSeedMm: [70, 0, 30],
    lesionSeedMm: S.lesion.c,
    spleenMm: S.spleen.c,
  };
}
