import type { AnchorHTMLAttributes } from 'react';
import { go, routeHash, type Route } from '../navigation';

type Props = { to: Route } & Omit<AnchorHTMLAttributes<HTMLAnchorElement>, 'href' | 'onClick'>;

/** A link to one of the app's screens: its address in the href, followed in this window. */
export function RouteLink({ to, ...rest }: Props) {
  return <a href={routeHash(to)} onClick={(e) => { e.preventDefault(); go(to); }} {...rest} />;
}
