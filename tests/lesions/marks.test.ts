import { describe, expect, it } from 'vitest';
import { isFalciformError } from '../../src/errors.js';
import { lesionFromMark, parseMarks } from '../../src/lesions/marks.js';

// Source: contracts.md, "Manual marks".
const EXAMPLE = {
  space: 'RAS',
  units: 'mm',
  marks: [{ id: 'M1', centreMm: [-70, -20, 4], longestAxialMm: 18.0, shortAxisMm: 12.5, endpointsMm: [[-79, -20, 4], [-61, -20, 4]] }],
};

function problem(doc: unknown): string {
  try {
    parseMarks(typeof doc === 'string' ? doc : JSON.stringify(doc), 'v2/marks.json');
  } catch (e) {
    if (isFalciformError(e) && e.kind === 'bad-file') return e.message;
    throw e;
  }
  throw new Error('no error');
}

const withMark = (m: Record<string, unknown>) => ({ marks: [{ ...EXAMPLE.marks[0], ...m }] });

describe('manual marks', () => {
  it('reads the contract example', () => {
    const [m] = parseMarks(JSON.stringify(EXAMPLE), 'marks.json');
    expect(m).toEqual({ id: 'M1', centreMm: [-70, -20, 4], longestAxialMm: 18, shortAxisMm: 12.5, endpointsMm: [[-79, -20, 4], [-61, -20, 4]] });
    const l = lesionFromMark(m);
    expect(l).toMatchObject({ id: 'M1', source: 'mark', volumeMl: null, max3dMm: null, voxelCount: 0, longestAxialMm: 18 });
  });

  it('keeps an optional viable diameter and takes the length from the calipers when it is left out', () => {
    const { longestAxialMm: _dropped, ...rest } = EXAMPLE.marks[0];
    const [m] = parseMarks(JSON.stringify({ marks: [{ ...rest, viableAxialMm: 9.5 }] }), 'marks.json');
    expect(m.longestAxialMm).toBeCloseTo(18, 12);
    expect(m.viableAxialMm).toBe(9.5);
    const [plain] = parseMarks(JSON.stringify({ marks: [{ id: 'A', centreMm: [0, 0, 0], longestAxialMm: 5, shortAxisMm: 4 }] }), 'm.json');
    expect(plain.endpointsMm).toBeNull();
    expect('viableAxialMm' in plain).toBe(false);
  });

  it('names the file, the mark and the problem', () => {
    expect(problem('{')).toMatch(/^v2\/marks\.json: not valid JSON/);
    expect(problem({ space: 'LPS', marks: [] })).toMatch(/space is "LPS"/);
    expect(problem({ units: 'cm', marks: [] })).toMatch(/units are "cm"/);
    expect(problem({})).toMatch(/needs a list "marks"/);
    expect(problem(withMark({ id: '' }))).toMatch(/mark 1 needs a non-empty "id"/);
    expect(problem({ marks: [EXAMPLE.marks[0], EXAMPLE.marks[0]] })).toMatch(/mark "M1" appears twice/);
    expect(problem(withMark({ centreMm: [1, 2] }))).toMatch(/mark "M1": centreMm must be three numbers/);
    expect(problem(withMark({ longestAxialMm: -1 }))).toMatch(/longestAxialMm must be a length/);
    expect(problem(withMark({ shortAxisMm: undefined }))).toMatch(/shortAxisMm must be a length/);
    expect(problem(withMark({ shortAxisMm: 19 }))).toMatch(/shortAxisMm 19 is longer than longestAxialMm 18/);
    expect(problem(withMark({ endpointsMm: [[0, 0, 0]] }))).toMatch(/endpointsMm must be two points/);
    expect(problem(withMark({ longestAxialMm: 25 }))).toMatch(/endpointsMm are 18\.0 mm apart but longestAxialMm is 25/);
    expect(problem(withMark({ viableAxialMm: 30 }))).toMatch(/viableAxialMm 30 is longer/);
  });
});
