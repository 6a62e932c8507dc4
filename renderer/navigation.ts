import { useEffect, useState } from 'react';

/** Where the app is; kept in the address's hash so a reload (or a test) lands on the same screen. */
export type Route =
  | { screen: 'patients' }
  | { screen: 'about' }
  | { screen: 'patient'; patientId: string; tab?: string }
  | { screen: 'visit'; patientId: string; visitId: string; lesionId?: string };

export function parseRoute(hash: string): Route {
  const [path, query = ''] = hash.replace(/^#\/?/, '').split('?');
  const parts = path.split('/').filter(Boolean).map(decodeURIComponent);
  const params = new URLSearchParams(query);
  if (parts[0] === 'about') return { screen: 'about' };
  if (parts[0] === 'patient' && parts[1]) {
    if (parts[2] === 'visit' && parts[3]) {
      const lesionId = params.get('lesion') ?? undefined;
      return { screen: 'visit', patientId: parts[1], visitId: parts[3], ...(lesionId ? { lesionId } : {}) };
    }
    const tab = params.get('tab') ?? undefined;
    return { screen: 'patient', patientId: parts[1], ...(tab ? { tab } : {}) };
  }
  return { screen: 'patients' };
}

export function routeHash(r: Route): string {
  const e = encodeURIComponent;
  if (r.screen === 'patient') return `#/patient/${e(r.patientId)}${r.tab ? `?tab=${e(r.tab)}` : ''}`;
  if (r.screen === 'about') return '#/about';
  if (r.screen === 'visit') return `#/patient/${e(r.patientId)}/visit/${e(r.visitId)}${r.lesionId ? `?lesion=${e(r.lesionId)}` : ''}`;
  return '#/';
}

export function go(r: Route): void {
  window.location.hash = routeHash(r);
}

export function useRoute(): Route {
  const [route, setRoute] = useState(() => parseRoute(window.location.hash));
  useEffect(() => {
    const update = () => setRoute(parseRoute(window.location.hash));
    window.addEventListener('hashchange', update);
    return () => window.removeEventListener('hashchange', update);
  }, []);
  return route;
}
