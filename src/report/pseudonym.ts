/**
 * A pseudonym for the patient id on an export. With a key it is HMAC-SHA256(key, id), so the same
 * key gives the same pseudonym in every export and whoever holds the key can link it back; without
 * one it is random and this export cannot be linked to any other. Web Crypto (`crypto.subtle`) runs
 * alike in Node 20 and in browsers, so the app and the command line agree for the same key.
 */
export interface Pseudonym {
  id: string;
  method: 'keyed' | 'random';
}

/** 48 bits of the digest: collisions are negligible for any one trial's patients. */
const PSEUDONYM_BYTES = 6;
const PREFIX = 'PS-';

const hex = (bytes: Uint8Array) => Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('').toUpperCase();

export async function keyedPseudonym(patientId: string, key: string): Promise<Pseudonym> {
  const enc = new TextEncoder();
  const k = await crypto.subtle.importKey('raw', enc.encode(key), { name: 'HMAC', hash: 'SHA-256' }, false, ['sign']);
  const mac = new Uint8Array(await crypto.subtle.sign('HMAC', k, enc.encode(patientId)));
  return { id: PREFIX + hex(mac.subarray(0, PSEUDONYM_BYTES)), method: 'keyed' };
}

export function randomPseudonym(): Pseudonym {
  return { id: PREFIX + hex(crypto.getRandomValues(new Uint8Array(PSEUDONYM_BYTES))), method: 'random' };
}

/** The sentence every pseudonymised export carries. */
export function pseudonymNote(p: Pseudonym): string {
  const how = p.method === 'keyed'
    ? 'a keyed pseudonym (HMAC-SHA256 with the key given), the same in every export made with that key'
    : 'a random pseudonym made for this export only, not linked to any other export';
  return `Pseudonymised: the patient id is replaced by ${how}; birth year, sex, height and weight are left out.`;
}

/** Replaces the patient id wherever it shows in free text (file names in warnings). */
export function scrubId(text: string, patientId: string, replacement: string): string {
  return patientId ? text.split(patientId).join(replacement) : text;
}
