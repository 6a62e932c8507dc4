import type { Manifest } from '../manifest/manifest.js';
import { NEW_LESION_CALLS, type NewLesionCall } from '../followup/reader-calls.js';
import { NON_TARGET_CALLS, OUTSIDE_LIVER_CALLS, type NonTargetCall, type OutsideLiverCall } from '../followup/recist.js';
import { optionalOption, UsageError, type ParsedArgs } from './args.js';

/**
 * Reader calls given on the command line, added to the manifest's (a command-line call replaces the
 * manifest's call for the same visit and lesion). Each option takes a comma-separated list:
 *   --non-target v2=present,v3=unequivocal-progression
 *   --outside-liver v2=none,v3=stable
 *   --new-lesion v2:L3=unequivocal
 *   --confirmed-gone v3:A             (track as "A" or "v1:L2")
 *   --too-small v2:L1
 */
export const READER_OPTIONS = ['non-target', 'outside-liver', 'new-lesion', 'confirmed-gone', 'too-small'] as const;

export const READER_USAGE =
  '[--non-target VISIT=present|absent|unequivocal-progression,…] [--outside-liver VISIT=none|not-assessed|stable|progression,…] ' +
  '[--new-lesion VISIT:LESION=equivocal|unequivocal,…] [--confirmed-gone VISIT:TRACK,…] [--too-small VISIT:LESION,…]';

export function withReaderOptions(m: Manifest, args: ParsedArgs): Manifest {
  const visits = m.visits.map((v) => ({ ...v, readerCalls: { ...(v.readerCalls ?? {}) } }));
  const visitOf = (option: string, id: string) => {
    const v = visits.find((x) => x.id === id);
    if (!v) throw new UsageError(`--${option}: no visit "${id}" in the manifest (visits: ${visits.map((x) => x.id).join(', ')})`);
    return v;
  };
  const items = (option: string) => (optionalOption(args, option) ?? '').split(',').filter((s) => s.length > 0);
  const split = (option: string, item: string, sep: string) => {
    const at = item.indexOf(sep);
    if (at <= 0 || at === item.length - 1) throw new UsageError(`--${option}: "${item}" must read LEFT${sep}RIGHT`);
    return [item.slice(0, at), item.slice(at + 1)] as const;
  };
  const oneOf = <T extends string>(option: string, value: string, allowed: readonly T[]): T => {
    if (!(allowed as readonly string[]).includes(value)) throw new UsageError(`--${option}: "${value}" must be one of ${allowed.join(', ')}`);
    return value as T;
  };
  for (const item of items('non-target')) {
    const [visit, call] = split('non-target', item, '=');
    visitOf('non-target', visit).readerCalls.nonTarget = oneOf<NonTargetCall>('non-target', call, NON_TARGET_CALLS);
  }
  for (const item of items('outside-liver')) {
    const [visit, call] = split('outside-liver', item, '=');
    visitOf('outside-liver', visit).readerCalls.outsideLiver = oneOf<OutsideLiverCall>('outside-liver', call, OUTSIDE_LIVER_CALLS);
  }
  for (const item of items('new-lesion')) {
    const [where, call] = split('new-lesion', item, '=');
    const [visit, lesion] = split('new-lesion', where, ':');
    const r = visitOf('new-lesion', visit).readerCalls;
    r.newLesions = { ...(r.newLesions ?? {}), [lesion]: oneOf<NewLesionCall>('new-lesion', call, NEW_LESION_CALLS) };
  }
  for (const item of items('confirmed-gone')) {
    const at = item.indexOf(':');
    if (at <= 0) throw new UsageError(`--confirmed-gone: "${item}" must read VISIT:TRACK`);
    const r = visitOf('confirmed-gone', item.slice(0, at)).readerCalls;
    r.confirmedGone = [...(r.confirmedGone ?? []), item.slice(at + 1)];
  }
  for (const item of items('too-small')) {
    const [visit, lesion] = split('too-small', item, ':');
    const r = visitOf('too-small', visit).readerCalls;
    r.tooSmall = [...(r.tooSmall ?? []), lesion];
  }
  return { ...m, visits };
}
