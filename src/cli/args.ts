/** A usage mistake on the command line: exit code 2. */
export class UsageError extends Error {
  override name = 'UsageError';
}

export interface ParsedArgs {
  positional: string[];
  options: Map<string, string | true>;
}

/**
 * Parses `--name value` and `--flag` options. `flags` lists the options that take no value;
 * every other option must be followed by one.
 */
export function parseArgs(argv: readonly string[], known: readonly string[], flags: readonly string[]): ParsedArgs {
  const positional: string[] = [];
  const options = new Map<string, string | true>();
  for (let n = 0; n < argv.length; n++) {
    const a = argv[n];
    if (!a.startsWith('--')) {
      positional.push(a);
      continue;
    }
    const name = a.slice(2);
    if (!known.includes(name) && !flags.includes(name)) throw new UsageError(`unknown option --${name}`);
    if (flags.includes(name)) {
      options.set(name, true);
      continue;
    }
    const value = argv[n + 1];
    if (value === undefined || value.startsWith('--')) throw new UsageError(`--${name} needs a value`);
    options.set(name, value);
    n++;
  }
  return { positional, options };
}

export function requireOption(args: ParsedArgs, name: string): string {
  const v = args.options.get(name);
  if (typeof v !== 'string') throw new UsageError(`--${name} is required`);
  return v;
}

export function optionalOption(args: ParsedArgs, name: string): string | undefined {
  const v = args.options.get(name);
  return typeof v === 'string' ? v : undefined;
}

/** `--max-lesions N`: the lesions-per-visit cap, a whole number ≥ 1. */
export function maxLesionsOption(args: ParsedArgs): number | undefined {
  const v = optionalOption(args, 'max-lesions');
  if (v === undefined) return undefined;
  const x = Number(v);
  if (!Number.isInteger(x) || x < 1) throw new UsageError(`--max-lesions must be a whole number ≥ 1, got "${v}"`);
  return x;
}

export function numberOption(args: ParsedArgs, name: string, fallback: number): number {
  const v = optionalOption(args, name);
  if (v === undefined) return fallback;
  const x = Number(v);
  if (!Number.isFinite(x) || x < 0) throw new UsageError(`--${name} must be a non-negative number, got "${v}"`);
  return x;
}
