/** The signed-in person for server-rendered pages (the session cookie checked against the database). */
import { cookies } from 'next/headers';
import { authenticateSession, SESSION_COOKIE, type Principal } from './sessions';

export async function pagePrincipal(): Promise<Principal | null> {
  const secret = (await cookies()).get(SESSION_COOKIE)?.value;
  if (!secret) return null;
  const r = await authenticateSession(secret, new Date());
  return r.ok ? r.principal : null;
}
