import { VERSION } from '../../src/version';
import { FONT_NOTICES } from '../fonts';

/** What the app is, its version, and the licences of what it ships with it (the fonts). */
export function About() {
  return (
    <section className="about" data-testid="about">
      <h2>About Falciform {VERSION}</h2>
      <p>Follows liver lesions over serial scans by Couinaud segment, with RECIST 1.1 / mRECIST response and segment-border margin alerts. MIT licence.</p>
      <h3>Fonts</h3>
      <p>
        The app, the board summary and its PDF use only these fonts, shipped with Falciform, so a page looks and breaks the
        same on every machine.
      </p>
      {FONT_NOTICES.map((n) => (
        <details key={n.font.family} className="about-font" data-testid="font-licence">
          <summary>
            <span className="about-font-name">{n.font.family}</span> {n.version} ({n.font.pkg}), {n.licenceName}
          </summary>
          <pre>{n.licence}</pre>
        </details>
      ))}
    </section>
  );
}
