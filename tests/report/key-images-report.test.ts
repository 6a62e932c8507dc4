import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DIAMETER_RGB, KEY_IMAGE_PX, OUTLINE_RGB } from '../../src/report/key-image.js';
import { pdfInfo, pdfWords } from './pdf.js';

// `falciform report` on the demo patient with a border alert (DEMO-0003: target A reaches into the next
// segment): the board page shows the key images of both targets at baseline and at the latest visit,
// on one sheet. Which tracks, lesions and sizes are expected comes from `falciform followup --json`;
// each image is read back by Pillow (python3-pil), and the PDF's images are listed by pdfimages
// (poppler-utils). The page is rendered to test-results/ with pdftoppm for a reader to look at.

const MANIFEST = 'demo-data/DEMO-0003/manifest.json';

interface Followup {
  visits: { id: string; marginAlerts: string[] }[];
  tracks: { id: string; target: boolean; lesions: Record<string, string>; longestAxialMm: Record<string, number> }[];
}

const falciform = (...args: string[]) =>
  spawnSync(process.execPath, ['bin/falciform.js', ...args], { encoding: 'utf8', env: { ...process.env, FALCIFORM_BROWSER: '/usr/bin/chromium' } });

let dir: string;
let followup: Followup;
let html: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'falciform-keys-'));
  const f = falciform('followup', MANIFEST, '--json');
  if (f.status !== 0) throw new Error(f.stderr);
  followup = JSON.parse(f.stdout) as Followup;
  const r = falciform('report', MANIFEST, '--out', join(dir, 'out'));
  if (r.status !== 0) throw new Error(r.stderr);
  html = readFileSync(join(dir, 'out', 'board-summary.html'), 'utf8');
}, 180_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('key images on the board page of a patient with a border alert', () => {
  it('shows each target and the alerted track at baseline and at the latest visit', () => {
    const [baseline, latest] = [followup.visits[0], followup.visits[followup.visits.length - 1]];
    expect(latest.marginAlerts).toContain('A');
    const shown = followup.tracks.filter((t) => t.target || latest.marginAlerts.includes(t.id));
    expect(shown.map((t) => t.id)).toEqual(['A', 'B']);
    const tiles = [...html.matchAll(/<div class="b-key" data-key-track="([^"]+)">(.*?)<\/div><\/div>/g)];
    expect(tiles.map((m) => m[1])).toEqual(['A', 'B']);
    for (const [k, t] of shown.entries()) {
      const tile = tiles[k][2];
      expect(tile).toContain(latest.marginAlerts.includes(t.id) ? 'target, margin alert' : 'target');
      for (const v of [baseline, latest]) {
        const lesion = t.lesions[v.id];
        expect(tile).toMatch(new RegExp(`<img src="data:image/png;base64,[A-Za-z0-9+/=]+" alt="${lesion} at ${v.id}"`));
        expect(tile).toContain(`${v.id} ${lesion} ${t.longestAxialMm[v.id].toFixed(1)} mm`);
      }
    }
  });

  it('each image is a PNG Pillow reads, with the white outline and the magenta diameter in it', () => {
    const urls = [...html.matchAll(/<img src="data:image\/png;base64,([A-Za-z0-9+/=]+)"/g)].map((m) => m[1]);
    expect(urls).toHaveLength(4);
    for (const [k, b64] of urls.entries()) {
      const file = join(dir, `key-${k}.png`);
      writeFileSync(file, Buffer.from(b64, 'base64'));
      const py = spawnSync('/usr/bin/python3', ['-c', [
        'import json, sys', 'from PIL import Image', 'im = Image.open(sys.argv[1]).convert("RGB")',
        'print(json.dumps({"size": list(im.size), "colours": [list(c) for c in sorted(set(im.getdata()))]}))',
      ].join('\n'), file], { encoding: 'utf8' });
      expect(py.stderr).toBe('');
      const r = JSON.parse(py.stdout) as { size: number[]; colours: number[][] };
      expect(r.size).toEqual([KEY_IMAGE_PX, KEY_IMAGE_PX]);
      const has = (c: readonly number[]) => r.colours.some((x) => x.join() === c.join());
      expect(has(OUTLINE_RGB)).toBe(true);
      expect(has(DIAMETER_RGB)).toBe(true);
    }
  });

  it('the PDF is one sheet that carries the four images', () => {
    const pdf = join(dir, 'out', 'board-summary.pdf');
    expect(pdfInfo(pdf).pages).toBe(1);
    expect(pdfWords(pdf)).toContain('Key images');
    expect(pdfWords(pdf)).toContain('sheet 1 of 1');
    const list = spawnSync('pdfimages', ['-list', pdf], { encoding: 'utf8' }).stdout.split('\n').slice(2).filter((l) => l.trim());
    const sizes = list.map((l) => l.trim().split(/\s+/).slice(3, 5).join('x'));
    expect(sizes.filter((s) => s === `${KEY_IMAGE_PX}x${KEY_IMAGE_PX}`)).toHaveLength(4);
    mkdirSync('test-results', { recursive: true });
    spawnSync('pdftoppm', ['-png', '-r', '110', '-singlefile', pdf, 'test-results/board-key-images-DEMO-0003']);
  });
});
