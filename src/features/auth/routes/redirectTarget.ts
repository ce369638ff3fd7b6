import type { Location } from 'react-router';

/** Where to go after signing in: the page the guard turned the user away from, else the start page. */
export function redirectTarget(location: Location): string {
  const from = (location.state as { from?: { pathname?: string; search?: string } } | null)?.from;
  if (from?.pathname && !from.pathname.startsWith('/signin')) return from.pathname + (from.search ?? '');
  return '/';
}
