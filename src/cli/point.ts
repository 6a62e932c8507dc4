import type { Vec3 } from '../geometry/mat4.js';
import { UsageError } from './args.js';

/** A point given on the command line as "X,Y,Z" (world RAS mm). */
export function parsePoint(text: string, option: string): Vec3 {
  const parts = text.split(',').map((s) => s.trim());
  const xs = parts.map(Number);
  if (parts.length !== 3 || parts.some((s) => s === '') || !xs.every(Number.isFinite)) {
    throw new UsageError(`--${option} must be three numbers X,Y,Z in mm, got "${text}"`);
  }
  return [xs[0], xs[1], xs[2]];
}

/** Pulls out options that may be given more than once (each with a value); the rest goes to parseArgs. */
export function takeRepeated(argv: readonly string[], names: readonly string[]): { seeds: Map<string, string[]>; rest: string[] } {
  const seeds = new Map<string, string[]>();
  const rest: string[] = [];
  for (let n = 0; n < argv.length; n++) {
    const name = argv[n].startsWith('--') ? argv[n].slice(2) : '';
    if (!names.includes(name)) {
      rest.push(argv[n]);
      continue;
    }
    const value = argv[n + 1];
    if (value === undefined || value.startsWith('--')) throw new UsageError(`--${name} needs a value`);
    seeds.set(name, [...(seeds.get(name) ?? []), value]);
    n++;
  }
  return { seeds, rest };
}
