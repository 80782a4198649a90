/** The signed-in person for server-rendered pages (the session cookie checked against the database). */
import { cookies, headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { authenticateSession, SESSION_COOKIE, type Principal } from './sessions';

export async function pagePrincipal(): Promise<Principal | null> {
  const secret = (await cookies()).get(SESSION_COOKIE)?.value;
  if (!secret) return null;
  const r = await authenticateSession(secret, new Date());
  return r.ok ? r.principal : null;
}

/**
 * Every page but /login calls this first: the session is checked against the database on each render,
 * client-side navigations included (the root layout alone runs only on full page loads), so a session
 * ended elsewhere (expired, account disabled, signed out on another server) gets no page data.
 */
export async function requirePagePrincipal(): Promise<Principal> {
  const who = await pagePrincipal();
  if (who) return who;
  const path = (await headers()).get('x-saltus-path') ?? '/';
  redirect(path === '/' ? '/login' : `/login?next=${encodeURIComponent(path)}`);
}
