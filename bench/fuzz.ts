// Fuzzing the file readers: random damage to valid NIfTI images, manifests, landmark sets, marks and
// segment schemes (bench/fuzz-cases.ts). Every case must end in a result or a typed error naming the
// file, within a second, without the NIfTI reader exceeding its memory budget. Prints the counts per
// reader; exits 1 with the (shrunk) failing case when one breaks the rule.
// Run: npx tsc -p tsconfig.node.json && node build/bench/fuzz.js [cases per reader] [seed]
import { performance } from 'node:perf_hooks';
import { describeTally, FUZZ_MAX_BYTES, fuzzParser, PARSERS } from './fuzz-cases.js';

const cases = Number(process.argv[2] ?? 10_000);
const seed = Number(process.argv[3] ?? 20260312);
if (!Number.isInteger(cases) || cases < 1 || !Number.isInteger(seed)) {
  console.error('usage: node build/bench/fuzz.js [cases per reader, default 10000] [seed]');
  process.exit(2);
}

console.log(`fuzz: ${cases} cases per reader, seed ${seed}, NIfTI memory budget ${FUZZ_MAX_BYTES / 1024 ** 2} MiB, Node ${process.version}`);
const t0 = performance.now();
let failures = 0;
let total = 0;
for (const parser of PARSERS) {
  const tally = await fuzzParser(parser, cases, seed);
  total += tally.cases;
  console.log(describeTally(tally));
  if (tally.failure) {
    failures++;
    console.log(`  FAILED ${tally.failure}`);
  }
}
console.log(`${total} cases in ${((performance.now() - t0) / 1000).toFixed(1)} s; ${failures} reader(s) broke the rule`);
process.exitCode = failures > 0 ? 1 : 0;
