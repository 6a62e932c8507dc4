import { Caution } from './components/Caution';
import { VERSION } from '../src/version';

/** The application frame: header, the current screen, the caution. */
export function App() {
  return (
    <div className="app">
      <header className="app-header">
        <h1 className="brand">Falciform</h1>
        <span className="tagline">Liver lesions by Couinaud segment, visit after visit</span>
        <span className="version">v{VERSION}</span>
      </header>
      <main className="app-main">
        <section className="patients" aria-labelledby="patients-title">
          <h2 id="patients-title">Patients</h2>
          <p className="empty" data-testid="no-patients">
            No patients stored on this computer yet. Import a patient folder with its manifest to begin.
          </p>
        </section>
      </main>
      <footer className="app-footer">
        <Caution />
      </footer>
    </div>
  );
}
