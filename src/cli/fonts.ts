import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { SHIPPED_FONTS, type ShippedFont } from '../report/fonts.js';

const require = createRequire(import.meta.url);

function packageDir(font: ShippedFont): string {
  return dirname(require.resolve(`${font.pkg}/package.json`));
}

/** A shipped font's licence text, as its package carries it. */
export function fontLicence(font: ShippedFont): string {
  return readFileSync(join(packageDir(font), 'LICENSE'), 'utf8');
}

let cached: string | null = null;

/**
 * The @font-face rules of every shipped face with each WOFF2 file inlined as a data URL, so a saved
 * board page renders the same offline and headless printing embeds these fonts and no other. The
 * package's own rules are kept (their unicode-range picks Latin or Latin Extended); the WOFF fallback
 * is dropped (every browser that prints reads WOFF2), and font-display waits for the font rather than
 * printing a fallback. Each font's licence goes with it as a comment.
 */
export function embeddedFontCss(): string {
  if (cached !== null) return cached;
  const parts: string[] = [];
  for (const font of SHIPPED_FONTS) {
    const dir = packageDir(font);
    parts.push(`/* ${font.family} (${font.pkg}):\n${fontLicence(font).replaceAll('*/', '* /').trim()}\n*/`);
    for (const face of font.faces) {
      const css = readFileSync(join(dir, `${face}.css`), 'utf8')
        .replace(/src: url\(\.\/files\/([^)]+\.woff2)\) format\('woff2'\)[^;]*;/g, (_m, file: string) =>
          `src: url(data:font/woff2;base64,${readFileSync(join(dir, 'files', file)).toString('base64')}) format('woff2');`)
        .replaceAll('font-display: swap;', 'font-display: block;');
      if (css.includes('url(./')) throw new Error(`${font.pkg}/${face}.css has a font source this build cannot inline`);
      parts.push(css.trim());
    }
  }
  cached = parts.join('\n');
  return cached;
}
