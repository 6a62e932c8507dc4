import { describe, expect, it } from 'vitest';
import { composeSlice, lesionOutlines, maskRuns } from '../../renderer/viewer/compose.js';
import { CODE_RGB, segmentOfCode } from '../../renderer/viewer/palette.js';
import { CT_PRESETS, dragWindow, grayOf, summariseValues } from '../../renderer/viewer/window-level.js';

describe('window and level', () => {
  it('offers a liver and a soft-tissue window with the usual values (common practice)', () => {
    // Liver window about W150–160 L60–70, abdominal soft tissue W400 L40: common practice in CT reading.
    const liver = CT_PRESETS.find((p) => p.name === 'Liver')!;
    expect(liver.width).toBeGreaterThanOrEqual(150);
    expect(liver.width).toBeLessThanOrEqual(160);
    expect(liver.centre).toBe(60);
    expect(CT_PRESETS.find((p) => p.name === 'Abdomen')).toMatchObject({ width: 400, centre: 40 });
  });

  it('maps the window linearly to black…white and clips outside it', () => {
    const wl = { centre: 40, width: 400 };
    expect(grayOf(-160, wl)).toBe(0);
    expect(grayOf(-1000, wl)).toBe(0);
    expect(grayOf(240, wl)).toBe(255);
    expect(grayOf(3000, wl)).toBe(255);
    expect(grayOf(40, wl)).toBe(128); // 127.5 rounds up
    expect(grayOf(-60, wl)).toBe(64); // a quarter of the way
  });

  it('right-drag widens to the right and raises the level downwards', () => {
    expect(dragWindow({ centre: 60, width: 160 }, 100, 0)).toEqual({ centre: 60, width: 260 });
    expect(dragWindow({ centre: 60, width: 160 }, 0, -50)).toEqual({ centre: 10, width: 160 });
    expect(dragWindow({ centre: 60, width: 10 }, -500, 0).width).toBe(1);
  });

  it('summarises a CT-like volume: its range, and a 1st–99th percentile window', () => {
    // 1000 voxels: 10 of air (−1000), 980 spread 0…979, 10 of bone (2000), stored with slope 1, inter −1024.
    const data = new Int16Array(1000);
    for (let n = 0; n < 1000; n++) data[n] = n < 10 ? 24 : n >= 990 ? 3024 : n - 10 + 1024;
    const s = summariseValues(data, 1, -1024);
    expect(s.min).toBe(-1000);
    expect(s.max).toBe(2000);
    expect(s.looksLikeCt).toBe(true);
    // 1st percentile: the 10th value (air), 99th: the 990th (979); histogram bins are 1.5 HU wide here.
    const lo = s.auto.centre - s.auto.width / 2, hi = s.auto.centre + s.auto.width / 2;
    expect(lo).toBeCloseTo(-1000, -1);
    expect(hi).toBeGreaterThan(975);
    expect(hi).toBeLessThan(981);
    expect(summariseValues(new Uint16Array([0, 100, 400, 900]), 1, 0).looksLikeCt).toBe(false);
  });

  it('an integer scan summarised from its histogram gives what the voxel-by-voxel float path gives', () => {
    let seed = 5;
    const data = new Int16Array(20000);
    for (let n = 0; n < data.length; n++) {
      seed = (Math.imul(seed, 1103515245) + 12345) >>> 0;
      data[n] = n % 7 === 0 ? -1000 + (seed >>> 28) : 40 + ((seed >>> 16) % 61) - 30;
    }
    for (const [slope, inter] of [[1, 0], [0.5, -12], [-1, 3]]) {
      expect(summariseValues(data, slope, inter)).toEqual(summariseValues(Float32Array.from(data), slope, inter));
    }
  });
});

describe('slice composition', () => {
  it('washes segment colours over the grey at the chosen opacity, IVb in stripes', () => {
    const out = new Uint8ClampedArray(4 * 4);
    // IVb (code 9) on a faint stripe, V (code 5), IVb on a full stripe, background; grey 127.5 everywhere.
    composeSlice({
      width: 4, height: 1, scan: [40, 40, 40, 40], slope: 1, inter: 0, window: { centre: 40, width: 400 },
      segments: [9, 5, 9, 0], opacity: 0.5,
    }, out);
    const gray = 127.5;
    const wash = (code: number, a: number) => [0, 1, 2].map((k) => Math.round(gray + (CODE_RGB[code * 3 + k] - gray) * a));
    expect([...out.slice(0, 3)]).toEqual(wash(9, 0.5 * 0.35));
    expect([...out.slice(4, 7)]).toEqual(wash(5, 0.5));
    expect([...out.slice(8, 11)]).toEqual(wash(9, 0.5));
    expect([...out.slice(12, 16)]).toEqual([128, 128, 128, 255]);
  });

  it('outlines each lesion along voxel borders and anchors its id at its top-left voxel', () => {
    // 4 × 3 slice: lesion 1 is an L of three voxels, lesion 2 a single voxel.
    const labels = [
      0, 1, 1, 0,
      0, 1, 0, 2,
      0, 0, 0, 0,
    ];
    const [one, two] = lesionOutlines(labels, 4, 3);
    expect(one.label).toBe(1);
    expect(one.anchor).toEqual({ col: 1, row: 0 });
    // An L-tromino has a perimeter of 8 voxel edges.
    expect(one.edges.length / 4).toBe(8);
    expect(two.edges.length / 4).toBe(4);
    expect(two.anchor).toEqual({ col: 3, row: 1 });
  });

  it('names codes by segment, code 4 as IVa only in a split map', () => {
    expect(segmentOfCode(4, false)).toBe('IV');
    expect(segmentOfCode(4, true)).toBe('IVa');
    expect(segmentOfCode(9, true)).toBe('IVb');
    expect(segmentOfCode(8, false)).toBe('VIII');
    expect(segmentOfCode(0, false)).toBeNull();
  });
});

describe('viable-tumour overlay', () => {
  it('gives the runs of set pixels row by row, a run at a row end closed at the width', () => {
    // 4 × 3 slice: row 0 "0110", row 1 "1001", row 2 "0011".
    const mask = Uint8Array.from([0, 1, 1, 0, 1, 0, 0, 1, 0, 0, 1, 1]);
    expect(maskRuns(mask, 4, 3)).toEqual([0, 1, 3, 1, 0, 1, 1, 3, 4, 2, 2, 4]);
    expect(maskRuns(new Uint8Array(12), 4, 3)).toEqual([]);
  });
});
