import { Caution } from './components/Caution';
import { LesionCap } from './components/LesionCap';
import { ReaderName } from './components/ReaderName';
import { RouteLink } from './components/RouteLink';
import { ScreenBoundary } from './components/ScreenBoundary';
import { routeHash, useRoute, type Route } from './navigation';
import { About } from './screens/About';
import { PatientList } from './screens/PatientList';
import { PatientWorkspace } from './screens/PatientWorkspace';
import { VERSION } from '../src/version';

/** The application frame: header, the current screen, the caution. */
export function App() {
  const route = useRoute();
  return (
    <div className="app">
      <header className="app-header">
        <h1 className="brand">
          <RouteLink to={{ screen: 'patients' }}>Falciform</RouteLink>
        </h1>
        <span className="tagline">Liver lesions by Couinaud segment, visit after visit</span>
        <span className="version"><ReaderName /> <LesionCap /> v{VERSION}</span>
        <RouteLink to={{ screen: 'about' }} className="about-link">About</RouteLink>
      </header>
      <main className="app-main">
        {/* Keyed by the address: a screen that failed is drawn afresh once the user goes elsewhere. */}
        <ScreenBoundary key={routeHash(route)} screen={screenName(route)}>
          {route.screen === 'patients' && <PatientList />}
          {route.screen === 'about' && <About />}
          {(route.screen === 'patient' || route.screen === 'visit') && <PatientWorkspace key={route.patientId} route={route} />}
        </ScreenBoundary>
      </main>
      <footer className="app-footer">
        <Caution />
      </footer>
    </div>
  );
}

function screenName(route: Route): string {
  if (route.screen === 'patients') return 'the patient list';
  if (route.screen === 'about') return 'the About page';
  if (route.screen === 'visit') return `visit ${route.visitId} of patient ${route.patientId}`;
  return `patient ${route.patientId}`;
}
