/**
 * Which patients one task of a sharded batch takes. A patient's shard depends only on its manifest's
 * path relative to the cohort folder (FNV-1a, 32 bit, of the path with "/" separators, modulo the
 * shard count), so N tasks of a scheduler's job array split a cohort with no coordination, and a
 * patient keeps its shard when others are added or removed. The split is even only on average.
 */
export interface Shard {
  /** 0 … count − 1, as a job array's task id with --array=0-(N-1). */
  index: number;
  count: number;
}

/** "K/N" → the shard, or the problem in words for a usage error. */
export function parseShard(text: string): Shard | { problem: string } {
  const m = /^(\d+)\/(\d+)$/.exec(text.trim());
  if (!m) return { problem: `--shard must be K/N (for example 0/4), got "${text}"` };
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (count < 1) return { problem: `--shard ${text}: N must be at least 1` };
  if (index >= count) return { problem: `--shard ${text}: K runs from 0 to N-1 (${count - 1})` };
  return { index, count };
}

/** FNV-1a over the string's UTF-16 code units (all ASCII for ordinary paths). */
function fnv1a(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h;
}

export function shardOf(manifestPath: string, count: number): number {
  return fnv1a(manifestPath) % count;
}

/** The manifests (relative paths with "/" separators) this shard takes, in the order given. */
export function shareOf(manifestPaths: readonly string[], shard: Shard): string[] {
  return manifestPaths.filter((p) => shardOf(p, shard.count) === shard.index);
}
