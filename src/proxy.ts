/**
 * Pages need a signed-in person. This first gate is cheap (no database): a request for a page without
 * the session cookie goes to /login?next=<page>. The root layout then checks the session itself on every
 * full page load (src/app/layout.tsx) and every API route checks it on every call
 * (src/server/api/http.ts), so a stale cookie gets no data. The page's path is passed on for the layout.
 */
import { NextResponse, type NextRequest } from 'next/server';

const SESSION_COOKIE = 'saltus_session';

export function proxy(request: NextRequest) {
  const { pathname, search } = request.nextUrl;
  if (pathname !== '/login' && !request.cookies.get(SESSION_COOKIE)?.value) {
    const to = request.nextUrl.clone();
    to.pathname = '/login';
    to.search = pathname === '/' ? '' : `?next=${encodeURIComponent(pathname + search)}`;
    return NextResponse.redirect(to);
  }
  const headers = new Headers(request.headers);
  headers.set('x-saltus-path', pathname + search);
  return NextResponse.next({ request: { headers } });
}

export const config = {
  // every page; not the API (checked per route), Next's assets or the rig service worker. Kept narrow so
  // that every page request gets x-saltus-path from here, never from the client.
  matcher: ['/((?!api/|_next/static/|_next/image|favicon\\.ico$|rig-sw\\.js$).*)'],
};
