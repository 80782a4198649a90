/**
 * Browser sessions and request authentication.
 *
 * A session cookie holds a random 32-byte secret; the database keeps only its SHA-256, so a copy of
 * the database does not sign anyone in. Sessions slide: each use within the idle limit pushes the
 * expiry on (written at most every few minutes); the cookie itself lives SESSION_MAX_DAYS at most.
 * Logging out deletes the row. API tokens (`Authorization: Bearer saltus_…`) are checked the same way:
 * SHA-256 of the secret and one lookup by its unique index — never argon2 per request — and an accepted
 * credential is then kept in memory for a few seconds (credential-cache.ts states the revocation delay).
 */
import { db } from '@/server/db/client';
import { isRole, type Role } from './roles';
import { TOKEN_PREFIX } from './accounts';
import { cachedCredential, forgetCredentials, rememberCredential } from './credential-cache';
import { csrfFor, randomSecret, safeEqual, sha256 } from './secrets';

export const SESSION_COOKIE = 'saltus_session';
export const CSRF_COOKIE = 'saltus_csrf';
export const CSRF_HEADER = 'x-csrf-token';

const HOUR = 3_600_000;
const idleMs = () => Number(process.env.SALTUS_SESSION_IDLE_HOURS ?? 7 * 24) * HOUR;
export const SESSION_MAX_DAYS = 30;
const TOUCH_EVERY_MS = 5 * 60_000;
const TOKEN_TOUCH_EVERY_MS = 60_000;
/** Last write of lastUsedAt / lastSeenAt per row in this process, so concurrent requests write it once. */
const touched = new Map<string, number>();
function shouldTouch(id: string, stored: Date | null, every: number, now: Date): boolean {
  const last = Math.max(stored?.getTime() ?? 0, touched.get(id) ?? 0);
  if (now.getTime() - last < every) return false;
  if (touched.size > 50_000) touched.clear();
  touched.set(id, now.getTime());
  return true;
}

export interface Principal {
  kind: 'session' | 'token';
  /** who the audit trail names: the account's e-mail, or token:<name> */
  actor: string;
  role: Role;
  /** display name */
  name: string;
  /** the session's cookie secret (for the CSRF check), sessions only */
  sessionSecret?: string;
}

export type AuthResult = { ok: true; principal: Principal } | { ok: false; reason: string };

export function readCookie(req: Request, name: string): string | null {
  const header = req.headers.get('cookie');
  if (!header) return null;
  for (const part of header.split(';')) {
    const eq = part.indexOf('=');
    if (eq < 0) continue;
    if (part.slice(0, eq).trim() === name) {
      try {
        return decodeURIComponent(part.slice(eq + 1).trim());
      } catch {
        return null;
      }
    }
  }
  return null;
}

export function isHttps(req: Request): boolean {
  const proto = req.headers.get('x-forwarded-proto');
  if (proto) return proto.split(',')[0]!.trim() === 'https';
  return new URL(req.url).protocol === 'https:';
}

/** Who is calling: a Bearer token if the request carries an Authorization header, else the session cookie. */
export async function authenticate(req: Request, now = new Date()): Promise<AuthResult | null> {
  const authz = req.headers.get('authorization');
  if (authz !== null) return authenticateToken(authz, now);
  const secret = readCookie(req, SESSION_COOKIE);
  if (secret) return authenticateSession(secret, now);
  return null;
}

async function authenticateToken(header: string, now: Date): Promise<AuthResult> {
  const m = /^Bearer\s+(\S+)$/i.exec(header.trim());
  if (!m || !m[1]!.startsWith(TOKEN_PREFIX)) {
    return { ok: false, reason: 'the Authorization header must be "Bearer saltus_…" with a token from `npm run saltus -- token create`' };
  }
  const hash = sha256(m[1]!);
  const client = await db();
  const hit = cachedCredential(hash, now.getTime());
  if (hit) {
    if (shouldTouch(hit.id, null, TOKEN_TOUCH_EVERY_MS, now)) {
      void client.apiToken.update({ where: { id: hit.id }, data: { lastUsedAt: now } }).catch(() => undefined);
    }
    return { ok: true, principal: hit.principal };
  }
  const t = await client.apiToken.findUnique({ where: { tokenHash: hash }, include: { user: { select: { disabledAt: true } } } });
  if (!t) return { ok: false, reason: 'the API token in the Authorization header is not known; create one with `npm run saltus -- token create`' };
  if (t.revokedAt) return { ok: false, reason: `the API token ${t.name} was revoked; create a new one with \`npm run saltus -- token create\`` };
  if (t.expiresAt && t.expiresAt <= now) return { ok: false, reason: `the API token ${t.name} expired; create a new one with \`npm run saltus -- token create\`` };
  if (t.user?.disabledAt) return { ok: false, reason: `the account that owns the API token ${t.name} is disabled` };
  if (!isRole(t.role)) return { ok: false, reason: `the API token ${t.name} has no valid role; create a new one` };
  if (shouldTouch(t.id, t.lastUsedAt, TOKEN_TOUCH_EVERY_MS, now)) {
    // not awaited: the request does not wait for this bookkeeping write
    void client.apiToken.update({ where: { id: t.id }, data: { lastUsedAt: now } }).catch(() => undefined);
  }
  const principal: Principal = { kind: 'token', actor: `token:${t.name}`, role: t.role, name: t.name };
  rememberCredential(hash, t.id, principal, t.expiresAt, now.getTime());
  return { ok: true, principal };
}

export async function authenticateSession(secret: string, now: Date): Promise<AuthResult> {
  const hash = sha256(secret);
  const client = await db();
  const hit = cachedCredential(hash, now.getTime());
  if (hit) {
    if (shouldTouch(hit.id, null, TOUCH_EVERY_MS, now)) {
      void client.session.update({ where: { id: hit.id }, data: { lastSeenAt: now, expiresAt: new Date(now.getTime() + idleMs()) } }).catch(() => undefined);
    }
    return { ok: true, principal: hit.principal };
  }
  const s = await client.session.findUnique({ where: { tokenHash: hash }, include: { user: true } });
  const expired = 'your session has ended; sign in again at /login';
  if (!s || s.expiresAt <= now) return { ok: false, reason: expired };
  if (s.user.disabledAt) return { ok: false, reason: 'this account is disabled; ask an admin' };
  if (!isRole(s.user.role)) return { ok: false, reason: 'this account has no valid role; ask an admin' };
  if (shouldTouch(s.id, s.lastSeenAt, TOUCH_EVERY_MS, now)) {
    void client.session.update({ where: { id: s.id }, data: { lastSeenAt: now, expiresAt: new Date(now.getTime() + idleMs()) } }).catch(() => undefined);
  }
  const principal: Principal = { kind: 'session', actor: s.user.email, role: s.user.role, name: s.user.name, sessionSecret: secret };
  rememberCredential(hash, s.id, principal, s.expiresAt, now.getTime());
  return { ok: true, principal };
}

/** Opens a session for a verified account; returns the cookie secret (never stored) and its CSRF value. */
export async function openSession(userId: string, userAgent: string, now = new Date()): Promise<{ secret: string; csrf: string }> {
  const secret = randomSecret(32);
  const client = await db();
  await client.session.create({
    data: { userId, tokenHash: sha256(secret), expiresAt: new Date(now.getTime() + idleMs()), lastSeenAt: now, userAgent: userAgent.slice(0, 300) },
  });
  return { secret, csrf: csrfFor(secret) };
}

export async function closeSession(secret: string): Promise<void> {
  const client = await db();
  await client.session.deleteMany({ where: { tokenHash: sha256(secret) } });
  forgetCredentials();
}

/** Set-Cookie values for a new session, or (secret null) clearing both cookies. */
export function sessionCookies(secret: string | null, secure: boolean): string[] {
  const flags = `Path=/; SameSite=Lax${secure ? '; Secure' : ''}`;
  if (secret === null) {
    return [`${SESSION_COOKIE}=; ${flags}; HttpOnly; Max-Age=0`, `${CSRF_COOKIE}=; ${flags}; Max-Age=0`];
  }
  const maxAge = SESSION_MAX_DAYS * 86_400;
  return [`${SESSION_COOKIE}=${secret}; ${flags}; HttpOnly; Max-Age=${maxAge}`, `${CSRF_COOKIE}=${csrfFor(secret)}; ${flags}; Max-Age=${maxAge}`];
}

/**
 * CSRF check for a cookie-authenticated change: the x-csrf-token header must equal the value bound to
 * the session, and an Origin header, when the browser sends one, must name this host.
 */
export function csrfProblem(req: Request, sessionSecret: string): string | null {
  const origin = req.headers.get('origin');
  if (origin !== null) {
    const host = req.headers.get('x-forwarded-host') ?? req.headers.get('host') ?? new URL(req.url).host;
    let originHost = '';
    try {
      originHost = new URL(origin).host;
    } catch {
      /* "null" or garbage */
    }
    if (originHost !== host) return `the request came from ${origin}, not from this site (${host}); changes are accepted only from Saltus pages`;
  }
  const sent = req.headers.get(CSRF_HEADER);
  if (!sent) return `a change signed in by cookie needs the ${CSRF_HEADER} header (the value of the ${CSRF_COOKIE} cookie); reload the page, or use an API token with Authorization: Bearer`;
  if (!safeEqual(sent, csrfFor(sessionSecret))) return `the ${CSRF_HEADER} header does not match this session; reload the page and try again`;
  return null;
}
