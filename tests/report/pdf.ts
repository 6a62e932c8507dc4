import { spawnSync } from 'node:child_process';

/** Page count and size of a PDF, from pdfinfo (Debian's poppler-utils). */
export function pdfInfo(file: string): { pages: number; widthPt: number; heightPt: number } {
  const r = spawnSync('pdfinfo', [file], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(r.stderr);
  const pages = Number(/Pages:\s+(\d+)/.exec(r.stdout)?.[1]);
  const size = /Page size:\s+([\d.]+) x ([\d.]+) pts/.exec(r.stdout);
  return { pages, widthPt: Number(size?.[1]), heightPt: Number(size?.[2]) };
}

/** The PDF's text (pdftotext), with runs of white space made single spaces. */
export function pdfWords(file: string): string {
  return spawnSync('pdftotext', [file, '-'], { encoding: 'utf8' }).stdout.replace(/\s+/g, ' ').trim();
}
