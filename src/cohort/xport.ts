/**
 * SAS transport (XPORT) version 5 files, as the SAS technical support document TS-140 ("Record
 * layout of a SAS Version 5 or 6 data set in SAS Transport (XPORT) format") lays them out; the
 * format regulators take SDTM datasets in. One dataset per file: 80-byte header records, one
 * 140-byte NAMESTR per variable, then the observations packed back to back and the last record padded
 * with blanks. Numbers are 8-byte IBM System/370 floating point (base 16, excess-64 exponent), a
 * missing number is "." followed by seven zero bytes. Text must be ASCII (version 5 has no encoding);
 * names at most 8 characters, labels 40, character values 200.
 */
export interface XportVariable {
  name: string;
  label: string;
  type: 'char' | 'num';
}

export interface XportDataset {
  name: string;
  label: string;
  variables: readonly XportVariable[];
  /** Values by variable name; a num variable's value is its decimal text, "" for missing. */
  rows: readonly Readonly<Record<string, string>>[];
}

const RECORD = 80;
const NAMESTR = 140;
const MONTHS = ['JAN', 'FEB', 'MAR', 'APR', 'MAY', 'JUN', 'JUL', 'AUG', 'SEP', 'OCT', 'NOV', 'DEC'];

/** "ddMMMyy:hh:mm:ss", the header's date form (TS-140), in UTC. */
function sasDate(d: Date): string {
  const p = (n: number) => String(n).padStart(2, '0');
  return `${p(d.getUTCDate())}${MONTHS[d.getUTCMonth()]}${p(d.getUTCFullYear() % 100)}:${p(d.getUTCHours())}:${p(d.getUTCMinutes())}:${p(d.getUTCSeconds())}`;
}

function ascii(text: string, what: string): string {
  if (!/^[\x20-\x7e]*$/.test(text)) throw new Error(`XPORT v5 holds ASCII only: ${what} "${text}"`);
  return text;
}

/** Text left-aligned in a field of `width`, padded with blanks; refuses text that does not fit. */
function field(text: string, width: number, what: string): string {
  if (text.length > width) throw new Error(`XPORT v5: ${what} "${text}" is longer than ${width} characters`);
  return ascii(text, what).padEnd(width, ' ');
}

/** IBM System/370 double: sign bit, 7-bit excess-64 base-16 exponent, 56-bit fraction in [1/16, 1). */
export function ibmDouble(x: number): Uint8Array {
  const out = new Uint8Array(8);
  if (Number.isNaN(x)) {
    out[0] = 0x2e; // "." — SAS missing
    return out;
  }
  if (x === 0) return out;
  if (!Number.isFinite(x)) throw new Error('XPORT v5 cannot hold an infinite number');
  const sign = x < 0 ? 0x80 : 0;
  let a = Math.abs(x);
  let e = 0;
  while (a >= 1) { a /= 16; e++; }
  while (a < 1 / 16) { a *= 16; e--; }
  if (e + 64 < 0 || e + 64 > 127) throw new Error(`XPORT v5 cannot hold ${x}`);
  // a·2^56 is a whole number: a has at most 53 significant bits and is at least 2^-4.
  let frac = BigInt(a * 2 ** 56);
  out[0] = sign | (e + 64);
  for (let i = 7; i >= 1; i--) {
    out[i] = Number(frac & 0xffn);
    frac >>= 8n;
  }
  return out;
}

function header(kind: string, tail: string): string {
  return `HEADER RECORD*******${kind.padEnd(8, ' ')}HEADER RECORD!!!!!!!${tail}`;
}

/** The headers' SAS version and operating-system fields name the writing program instead. */
export function xportFile(ds: XportDataset, made: Date, writer: { version: string; os: string }): Uint8Array {
  const stamp = sasDate(made);
  const vars = ds.variables;
  if (vars.length > 9999) throw new Error('XPORT v5: more than 9999 variables');
  const lengths = vars.map((v) => (v.type === 'num' ? 8 : Math.max(1, ...ds.rows.map((r) => (r[v.name] ?? '').length))));
  lengths.forEach((n, k) => {
    if (n > 200) throw new Error(`XPORT v5: a value of ${vars[k].name} is longer than 200 characters`);
  });

  const text: string[] = [
    header('LIBRARY', '0'.repeat(30) + '  '),
    `SAS     SAS     SASLIB  ${field(writer.version, 8, 'version')}${field(writer.os, 8, 'OS')}${' '.repeat(24)}${stamp}`,
    `${stamp}${' '.repeat(64)}`,
    header('MEMBER', '000000000000000001600000000140  '),
    header('DSCRPTR', '0'.repeat(30) + '  '),
    `SAS     ${field(ds.name, 8, 'dataset name')}SASDATA ${field(writer.version, 8, 'version')}${field(writer.os, 8, 'OS')}${' '.repeat(24)}${stamp}`,
    `${stamp}${' '.repeat(16)}${field(ds.label, 40, 'dataset label')}${' '.repeat(8)}`,
    header('NAMESTR', `000000${String(vars.length).padStart(4, '0')}${'0'.repeat(20)}  `),
  ];
  const head = new TextEncoder().encode(text.join(''));

  const names = new Uint8Array(Math.ceil((vars.length * NAMESTR) / RECORD) * RECORD).fill(0x20);
  const view = new DataView(names.buffer);
  const put = (at: number, s: string) => names.set(new TextEncoder().encode(s), at);
  let pos = 0;
  vars.forEach((v, k) => {
    const at = k * NAMESTR;
    names.fill(0, at, at + NAMESTR);
    view.setInt16(at, v.type === 'num' ? 1 : 2);
    view.setInt16(at + 2, 0);
    view.setInt16(at + 4, lengths[k]);
    view.setInt16(at + 6, k + 1);
    put(at + 8, field(v.name, 8, 'variable name'));
    put(at + 16, field(v.label, 40, 'variable label'));
    put(at + 56, ' '.repeat(8)); // no format
    put(at + 72, ' '.repeat(8)); // no informat
    view.setInt32(at + 84, pos);
    pos += lengths[k];
  });

  const obsHead = new TextEncoder().encode(header('OBS', '0'.repeat(30) + '  '));
  const rowBytes = pos;
  const dataLength = Math.ceil((rowBytes * ds.rows.length) / RECORD) * RECORD;
  const data = new Uint8Array(dataLength).fill(0x20);
  ds.rows.forEach((r, n) => {
    let at = n * rowBytes;
    vars.forEach((v, k) => {
      const value = r[v.name] ?? '';
      if (v.type === 'num') {
        const x = value === '' ? NaN : Number(value);
        if (value !== '' && !Number.isFinite(x)) throw new Error(`XPORT v5: ${v.name} "${value}" is not a number`);
        data.set(ibmDouble(x), at);
      } else {
        data.set(new TextEncoder().encode(field(value, lengths[k], v.name)), at);
      }
      at += lengths[k];
    });
  });

  const out = new Uint8Array(head.length + names.length + obsHead.length + data.length);
  out.set(head, 0);
  out.set(names, head.length);
  out.set(obsHead, head.length + names.length);
  out.set(data, head.length + names.length + obsHead.length);
  return out;
}
