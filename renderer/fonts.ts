// The shipped fonts in the app's bundle: Vite copies each font file beside the scripts and the
// licences beside the fonts (vite.config.ts). The families are the ones the board page and every
// output use (src/report/fonts.ts), so the app looks the same on every machine.
import '@fontsource/atkinson-hyperlegible-next/400.css';
import '@fontsource/atkinson-hyperlegible-next/400-italic.css';
import '@fontsource/atkinson-hyperlegible-next/700.css';
import '@fontsource/atkinson-hyperlegible-mono/400.css';
import '@fontsource/atkinson-hyperlegible-mono/700.css';
import sansLicence from '@fontsource/atkinson-hyperlegible-next/LICENSE?raw';
import monoLicence from '@fontsource/atkinson-hyperlegible-mono/LICENSE?raw';
// Named imports, so only these two fields of each package.json reach the bundle.
import { license as sansLicenceName, version as sansVersion } from '@fontsource/atkinson-hyperlegible-next/package.json';
import { license as monoLicenceName, version as monoVersion } from '@fontsource/atkinson-hyperlegible-mono/package.json';
import { MONO_FONT, SANS_FONT, fontStack, type ShippedFont } from '../src/report/fonts';

export interface FontNotice {
  font: ShippedFont;
  version: string;
  licenceName: string;
  licence: string;
}

export const FONT_NOTICES: readonly FontNotice[] = [
  { font: SANS_FONT, version: sansVersion, licenceName: sansLicenceName, licence: sansLicence },
  { font: MONO_FONT, version: monoVersion, licenceName: monoLicenceName, licence: monoLicence },
];

/**
 * The app's two font variables, set from the core's font list. A constructable stylesheet, since the
 * app's CSP allows no inline styles.
 */
export function adoptFontVariables(): void {
  const sheet = new CSSStyleSheet();
  sheet.replaceSync(`:root { --font-sans: ${fontStack(SANS_FONT)}; --font-mono: ${fontStack(MONO_FONT)}; }`);
  document.adoptedStyleSheets = [...document.adoptedStyleSheets, sheet];
}
