import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ibmDouble, xportFile } from '../../src/cohort/xport.js';

// SAS XPORT v5 (SAS technical support document TS-140) written by src/cohort/xport.ts and read back
// by an independent reader: pandas.read_sas(format="xport") from Debian's python3-pandas, run live.

const dir = mkdtempSync(join(tmpdir(), 'falciform-xport-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const hex = (b: Uint8Array) => Buffer.from(b).toString('hex').toUpperCase();

function readBack(bytes: Uint8Array) {
  const file = join(dir, `t${Math.random().toString(36).slice(2)}.xpt`);
  writeFileSync(file, bytes);
  const r = spawnSync('/usr/bin/python3', ['tests/reference/xport_read.py', file], { encoding: 'utf8' });
  expect(r.status, r.stderr).toBe(0);
  return JSON.parse(r.stdout) as {
    name: string; label: string;
    variables: { name: string; label: string; type: string; length: number }[];
    rows: (string | number | null)[][];
  };
}

describe('IBM System/370 double', () => {
  it('encodes the textbook values', () => {
    // IBM hexadecimal floating point: 1.0 is 41 10 00 …, -118.625 is C2 76 A0 00 … (the worked example
    // in IBM's System/370 Principles of Operation as commonly quoted, from memory); 0 is all zero bytes.
    expect(hex(ibmDouble(1))).toBe('4110000000000000');
    expect(hex(ibmDouble(-118.625))).toBe('C276A00000000000');
    expect(hex(ibmDouble(0))).toBe('0000000000000000');
    expect(hex(ibmDouble(0.5))).toBe('4080000000000000');
    // SAS's ordinary missing value: "." then zeros (TS-140).
    expect(hex(ibmDouble(NaN))).toBe('2E00000000000000');
  });
});

describe('xportFile', () => {
  it('is read back by pandas with the same names, labels, types and values', () => {
    const numbers = ['1', '-118.625', '0', '', '24.7', '123456.789', '0.001', '3'];
    const rows = numbers.map((n, k) => ({ USUBJID: `S-${k}`, TRSTRESN: n, TRTEST: k % 2 ? 'Longest Diameter' : 'Sum of Diameters', NOTE: '' }));
    const bytes = xportFile(
      {
        name: 'TR', label: 'Tumor/Lesion Results',
        variables: [
          { name: 'USUBJID', label: 'Unique Subject Identifier', type: 'char' },
          { name: 'TRSTRESN', label: 'Numeric Result', type: 'num' },
          { name: 'TRTEST', label: 'Test Name', type: 'char' },
          { name: 'NOTE', label: '', type: 'char' },
        ],
        rows,
      },
      new Date(Date.UTC(2026, 11, 2, 13, 5, 9)),
      { version: '0.1.0', os: 'FALCIFRM' },
    );
    expect(bytes.length % 80).toBe(0); // TS-140: every record is 80 bytes
    const got = readBack(bytes);
    expect(got.name).toBe('TR');
    expect(got.label).toBe('Tumor/Lesion Results');
    expect(got.variables).toEqual([
      { name: 'USUBJID', label: 'Unique Subject Identifier', type: 'char', length: 3 },
      { name: 'TRSTRESN', label: 'Numeric Result', type: 'numeric', length: 8 },
      { name: 'TRTEST', label: 'Test Name', type: 'char', length: 16 },
      { name: 'NOTE', label: '', type: 'char', length: 1 },
    ]);
    expect(got.rows).toHaveLength(rows.length);
    got.rows.forEach((r, k) => {
      expect(r[0]).toBe(rows[k].USUBJID);
      if (numbers[k] === '') expect(r[1]).toBeNull();
      else expect(r[1]).toBeCloseTo(Number(numbers[k]), 12);
      expect(r[2]).toBe(rows[k].TRTEST);
      expect(r[3]).toBe('');
    });
  });

  it('refuses what version 5 cannot hold', () => {
    const ds = (name: string, value: string) => ({ name: 'TU', label: '', variables: [{ name, label: '', type: 'char' as const }], rows: [{ [name]: value }] });
    expect(() => xportFile(ds('TOOLONGNAME', 'x'), new Date(), { version: '1', os: 'X' })).toThrow(/longer than 8/);
    expect(() => xportFile(ds('A', 'Ségment'), new Date(), { version: '1', os: 'X' })).toThrow(/ASCII only/);
    expect(() => xportFile(ds('A', 'x'.repeat(201)), new Date(), { version: '1', os: 'X' })).toThrow(/longer than 200/);
  });
});
