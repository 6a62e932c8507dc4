import { Caution } from './components/Caution';
import { PatientList } from './screens/PatientList';
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
        <PatientList />
      </main>
      <footer className="app-footer">
        <Caution />
      </footer>
    </div>
  );
}
