/** Signing in and out with e-mail and password; the answers set or clear the session cookies. */
import { z } from 'zod';
import { parseWith } from '@/server/api/validation';
import { db } from '@/server/db/client';
import { tooMany, type Caller } from './guard';
import { dummyHash, verifyPassword } from './passwords';
import { clearLoginFailures, loginBlocked, recordLoginFailure } from './rate-limit';
import { closeSession, isHttps, openSession, readCookie, sessionCookies, SESSION_COOKIE } from './sessions';

const loginSchema = z.object({
  email: z.string().trim().toLowerCase().min(1, 'give the e-mail address of your account').max(200),
  password: z.string().min(1, 'give your password').max(1024, 'the password is longer than 1024 characters'),
});

function json(body: unknown, status: number, cookies: string[] = [], extra: Record<string, string> = {}): Response {
  const headers = new Headers({ 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...extra });
  for (const c of cookies) headers.append('set-cookie', c);
  return new Response(JSON.stringify(body), { status, headers });
}

/** The client address as the server saw it (next start sets x-forwarded-for; behind a proxy, the proxy's value). */
export function clientAddress(req: Request): string {
  return req.headers.get('x-forwarded-for')?.split(',')[0]?.trim() || req.headers.get('x-real-ip') || 'local';
}

function crossSite(req: Request): boolean {
  const origin = req.headers.get('origin');
  if (origin === null) return false;
  const host = req.headers.get('x-forwarded-host') ?? req.headers.get('host') ?? new URL(req.url).host;
  try {
    return new URL(origin).host !== host;
  } catch {
    return true;
  }
}

export async function loginHandler(req: Request, input: unknown, now = new Date()): Promise<Response> {
  if (crossSite(req)) return json({ error: { code: 'csrf', message: 'sign in from the Saltus /login page of this site', field: 'Origin' } }, 403);
  const { email, password } = parseWith(loginSchema, input);
  const keys = [`account:${email}`, `address:${clientAddress(req)}`];
  const blocked = loginBlocked(keys, now.getTime());
  if (blocked) return tooMany('too many failed sign-ins for this account or from this address', blocked.retryAfterSeconds, 'password');

  const client = await db();
  const user = await client.user.findUnique({ where: { email } });
  const ok = await verifyPassword(user?.passwordHash ?? (await dummyHash()), password);
  if (!user || !ok || user.disabledAt) {
    recordLoginFailure(keys, now.getTime());
    const message = user?.disabledAt && ok ? 'this account is disabled; ask an admin' : 'the e-mail or the password is wrong; check both and try again';
    return json({ error: { code: 'invalid_credentials', message, field: 'password' } }, 401);
  }
  clearLoginFailures(keys[0]!);
  const { secret, csrf } = await openSession(user.id, req.headers.get('user-agent') ?? '', now);
  return json({ user: { email: user.email, name: user.name, role: user.role }, csrf }, 200, sessionCookies(secret, isHttps(req)));
}

export async function logoutHandler(req: Request): Promise<Response> {
  if (crossSite(req)) return json({ error: { code: 'csrf', message: 'sign out from a Saltus page of this site', field: 'Origin' } }, 403);
  const secret = readCookie(req, SESSION_COOKIE);
  if (secret) await closeSession(secret);
  return json({ signedOut: true }, 200, sessionCookies(null, isHttps(req)));
}

export function meHandler(caller: Caller) {
  return { actor: caller.actor, name: caller.name, role: caller.role, kind: caller.kind };
}
