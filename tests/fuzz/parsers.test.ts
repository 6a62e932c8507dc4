// Property-based fuzzing of the file readers, sized for every test run: a few hundred damaged files
// per reader with a fixed seed, so a failure reproduces. The long run is bench/fuzz.ts. The rule
// (bench/fuzz-cases.ts): a result or a typed error naming the file, within a second, and the NIfTI
// reader never asks for more memory than its budget.
import { describe, expect, it } from 'vitest';
import {
  buildJson, describeTally, fuzzParser, JSON_SEEDS, NIFTI_SEEDS, PARSERS, runJsonCase, runNiftiCase, type JsonParser,
} from '../../bench/fuzz-cases.js';
import { isFalciformError } from '../../src/errors.js';
import { parseMarks } from '../../src/lesions/marks.js';
import { parseLandmarks } from '../../src/segments/landmarks.js';
import { parseScheme } from '../../src/segments/scheme.js';

const SEED = 20260312;
const CASES = 500;

describe('the files the fuzzer starts from are valid', () => {
  it('every NIfTI seed reads, plain and gzipped, with both inflaters', async () => {
    for (let seed = 0; seed < NIFTI_SEEDS.length; seed++) {
      for (const gzip of [false, true]) {
        for (const inflater of ['node', 'web'] as const) {
          const report = await runNiftiCase({ seed, ops: [], gzip, gzOps: [], imageCut: null, inflater });
          expect(report.outcome, `${NIFTI_SEEDS[seed].label} gzip=${gzip} ${inflater}`).toBe('result');
        }
      }
    }
  });

  it('every manifest, landmark set, marks file and scheme seed parses', async () => {
    for (const parser of Object.keys(JSON_SEEDS) as JsonParser[]) {
      for (let seed = 0; seed < JSON_SEEDS[parser].length; seed++) {
        const c = { seed, ops: [], textOps: [] };
        expect(JSON.parse(buildJson(parser, c))).toEqual(JSON_SEEDS[parser][seed]);
        expect((await runJsonCase(parser, c)).outcome, `${parser} seed ${seed}`).toBe('result');
      }
    }
  });
});

describe(`${CASES} damaged files per reader (seed ${SEED})`, () => {
  for (const parser of PARSERS) {
    it(`${parser}: each ends in a result or a typed error naming the file, within a second`, async () => {
      const rssBefore = process.memoryUsage.rss();
      const tally = await fuzzParser(parser, CASES, SEED);
      console.log(describeTally(tally));
      expect(tally.failure).toBeNull();
      expect(tally.cases).toBe(CASES);
      // The damage must be varied enough to reach both outcomes.
      const typed = Object.values(tally.errors).reduce((a, b) => a + b, 0);
      expect(tally.results).toBeGreaterThan(CASES / 20);
      expect(typed).toBeGreaterThan(CASES / 5);
      expect(tally.results + typed).toBe(CASES);
      expect(tally.slowestMs).toBeLessThan(1000);
      // Inputs are at most a few MB; a header whose claimed size got past the budget would show here.
      expect(tally.peakRssMiB - rssBefore / 1024 ** 2).toBeLessThan(512);
      // Lying headers are among the cases: some claim more than the budget and are refused for it.
      if (parser === 'nifti') expect(tally.errors['too-large']).toBeGreaterThan(0);
    });
  }
});

// Defects the fuzzer found, kept as plain cases so they stay fixed.
describe('found by fuzzing', () => {
  const deep = (n: number) => '['.repeat(n) + ']'.repeat(n);

  it('a landmark set whose "space" or "units" is nested thousands deep gets a typed error, not a stack overflow', () => {
    for (const field of ['space', 'units']) {
      let caught: unknown;
      try {
        parseLandmarks(`{"${field}": ${deep(20000)}, "points": {}}`, 'v2/landmarks.json');
      } catch (e) {
        caught = e;
      }
      expect(isFalciformError(caught) && caught.kind).toBe('bad-landmarks');
      expect((caught as Error).message).toBe(
        field === 'space'
          ? 'v2/landmarks.json: space is a list; landmark points must be in RAS (convert LPS by negating x and y)'
          : 'v2/landmarks.json: units is a list; expected "mm"',
      );
    }
  });

  it('a marks file whose "space" or "units" is nested thousands deep gets a typed error, not a stack overflow', () => {
    for (const field of ['space', 'units']) {
      let caught: unknown;
      try {
        parseMarks(`{"${field}": ${deep(20000)}, "marks": []}`, 'v2/marks.json');
      } catch (e) {
        caught = e;
      }
      expect(isFalciformError(caught) && caught.kind, String(caught)).toBe('bad-file');
      expect((caught as Error).message).toMatch(new RegExp(`^v2/marks\\.json: ${field === 'space' ? 'space is' : 'units are'} `));
    }
  });

  it('a scheme whose segment name is nested thousands deep gets a typed error, not a stack overflow', () => {
    expect(() => parseScheme(`{"labels": {"4": ${deep(20000)}}}`, 'v1/scheme.json')).toThrow(
      /^v1\/scheme\.json: label 4: unknown segment name a list \(expected one of I, II/,
    );
    expect(() => parseScheme('{"labels": {"4": {"a": {"b": 1}}}}', 'v1/scheme.json')).toThrow(/unknown segment name an object/);
  });
});
