/**
 * Who may do what, checked against the one permission table (src/server/auth/permissions.ts):
 *  - every src/app/api/**\/route.ts method has a line in the table (add yours when you add a route);
 *  - every route × method × {no credentials, viewer, operator, planner, admin} answers 401, 403 or
 *    neither exactly as the table says;
 *  - CSRF: a cookie-signed change without the x-csrf-token header is refused, with it accepted; a
 *    Bearer token needs no header; a foreign Origin is refused;
 *  - sessions end at logout, disabled accounts and revoked or expired tokens are refused;
 *  - the audit trail names the real account or token.
 */
import { readFileSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { createToken, disableUser, revokeToken } from '@/server/auth/accounts';
import { lookupPermission, PERMISSIONS } from '@/server/auth/permissions';
import { resetRateLimits } from '@/server/auth/rate-limit';
import { ROLES, roleAtLeast, type Role } from '@/server/auth/roles';
import { closeDb, db } from '@/server/db/client';
import { createCampaign } from '@/server/repos/campaigns';
import { bearer, tokenFor, userFor } from '../support/auth';
import { freshDatabase, repoRoot } from './database';

type Handler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;
const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
const apiDir = path.join(repoRoot, 'src', 'app', 'api');

function routeFiles(dir = apiDir): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) return routeFiles(full);
    return name === 'route.ts' ? [full] : [];
  });
}

/** Every exported handler: method, URL pattern, file. */
function exportedRoutes() {
  return routeFiles().flatMap((file) => {
    const source = readFileSync(file, 'utf8');
    const pattern = '/api/' + path.relative(apiDir, path.dirname(file)).split(path.sep).join('/');
    return METHODS.filter((m) => new RegExp(`export\\s+(const\\s+${m}\\b|(async\\s+)?function\\s+${m}\\b)`).test(source)).map((method) => ({ method, pattern, file, source }));
  });
}

const body = (method: string) => (method === 'GET' ? undefined : '{}');

describe('the permission table covers every route', () => {
  it('has a line for every exported method of every route file', () => {
    const routes = exportedRoutes();
    expect(routes.length).toBeGreaterThan(20);
    const missing = routes.filter((r) => !(`${r.method} ${r.pattern}` in PERMISSIONS)).map((r) => `'${r.method} ${r.pattern}'`);
    expect(missing, `add these to PERMISSIONS in src/server/auth/permissions.ts with the least role that may call them: ${missing.join(', ')}`).toEqual([]);
  });

  it('routes that need a role go through the checking wrappers of src/server/api/http.ts', () => {
    for (const r of exportedRoutes()) {
      if (PERMISSIONS[`${r.method} ${r.pattern}`] === 'public') continue;
      expect(/\b(route|jsonPost)\(/.test(r.source) && r.source.includes('@/server/api/http'), `${r.file} must wrap ${r.method} in route() or jsonPost()`).toBe(true);
    }
  });

  it('matches literal segments before [params] and closes unknown routes to all but admins', () => {
    expect(lookupPermission('POST', '/api/v1/campaigns/abc/trials/log')?.pattern).toBe('/api/v1/campaigns/[id]/trials/log');
    expect(lookupPermission('GET', '/api/v1/campaigns/abc/trials/t1')?.pattern).toBe('/api/v1/campaigns/[id]/trials/[trialId]');
    expect(lookupPermission('DELETE', '/api/v1/campaigns/abc')).toBeNull();
    expect(lookupPermission('GET', '/api/v1/nothing-here')).toBeNull();
  });
});

describe('role × route matrix', () => {
  const tokens = {} as Record<Role, string>;
  const handlers = new Map<string, Handler>();
  let campaignId = '';

  beforeAll(async () => {
    await freshDatabase();
    resetRateLimits();
    for (const role of ROLES) tokens[role] = await tokenFor(role);
    campaignId = (
      await createCampaign(
        campaignCreateSchema.parse({
          name: 'Matrix target',
          factors: [{ name: 'payload', kind: 'continuous', low: 0, high: 2 }],
          responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
          rigs: [{ name: 'Bench A' }],
        }),
      )
    ).id;
    for (const r of exportedRoutes()) {
      const mod = (await import(/* @vite-ignore */ r.file)) as Record<string, Handler>;
      handlers.set(`${r.method} ${r.pattern}`, mod[r.method]!);
    }
  });
  afterAll(async () => {
    await closeDb();
  });

  it('answers 401 without credentials, 403 below the needed role, and neither at or above it', async () => {
    const params = { id: campaignId, trialId: 'no-such-trial', suggestionId: 'no-such-suggestion' };
    let checked = 0;
    for (const [key, need] of Object.entries(PERMISSIONS)) {
      const handler = handlers.get(key);
      if (!handler || need === 'public') continue;
      const [method, pattern] = key.split(' ') as [string, string];
      const url = 'http://localhost' + pattern.replace(/\[(\w+)\]/g, (_, p: string) => params[p as keyof typeof params] ?? 'x');
      const call = (headers: Record<string, string>) =>
        handler(new Request(url, { method, body: body(method), headers: { 'content-type': 'application/json', ...headers } }), { params: Promise.resolve(params) });

      const anonymous = await call({});
      expect(anonymous.status, `${key} without credentials`).toBe(401);
      expect(((await anonymous.json()) as { error: { field: string } }).error.field).toBe('Authorization');
      for (const role of ROLES) {
        const res = await call(bearer(tokens[role]));
        if (roleAtLeast(role, need)) {
          expect([401, 403], `${key} as ${role} (needs ${need}) answered ${res.status}`).not.toContain(res.status);
        } else {
          expect(res.status, `${key} as ${role} (needs ${need})`).toBe(403);
          const err = ((await res.json()) as { error: { code: string; message: string } }).error;
          expect(err.code).toBe('forbidden');
          expect(err.message).toContain(need);
        }
        checked += 1;
      }
    }
    expect(checked).toBeGreaterThan(100);
  }, 240_000);

  it('answers 401 naming the problem for a malformed, unknown, revoked or expired token', async () => {
    const list = handlers.get('GET /api/v1/campaigns')!;
    const get = (authorization: string) => list(new Request('http://localhost/api/v1/campaigns', { headers: { authorization } }), { params: Promise.resolve({}) });
    expect((await get('Basic abc')).status).toBe(401);
    expect((await get('Bearer saltus_unknown')).status).toBe(401);
    const { token } = await createToken({ name: 'short-lived', role: 'viewer', expiresDays: 1 }, 'test', new Date(Date.now() - 2 * 86_400_000));
    const expired = await get(`Bearer ${token}`);
    expect(expired.status).toBe(401);
    expect(((await expired.json()) as { error: { message: string } }).error.message).toMatch(/expired/);
    const { token: t2 } = await createToken({ name: 'to-revoke', role: 'viewer' }, 'test');
    expect((await get(`Bearer ${t2}`)).status).toBe(200);
    const client = await db();
    await expect.poll(async () => (await client.apiToken.findFirst({ where: { name: 'to-revoke' } }))?.lastUsedAt ?? null).not.toBeNull();
    await revokeToken('to-revoke', 'test');
    const revoked = await get(`Bearer ${t2}`);
    expect(revoked.status).toBe(401);
    expect(((await revoked.json()) as { error: { message: string } }).error.message).toMatch(/revoked/);
  });

  it('honours a revocation made by another process within the cache time (SALTUS_AUTH_CACHE_MS)', async () => {
    const saved = process.env.SALTUS_AUTH_CACHE_MS;
    process.env.SALTUS_AUTH_CACHE_MS = '300';
    try {
      const list = handlers.get('GET /api/v1/campaigns')!;
      const { token } = await createToken({ name: 'revoked-elsewhere', role: 'viewer' }, 'test');
      const get = () => list(new Request('http://localhost/api/v1/campaigns', { headers: bearer(token) }), { params: Promise.resolve({}) });
      expect((await get()).status).toBe(200);
      // as the CLI would: straight to the database, this process's cache not told
      await (await db()).apiToken.updateMany({ where: { name: 'revoked-elsewhere' }, data: { revokedAt: new Date() } });
      await new Promise((r) => setTimeout(r, 350));
      expect((await get()).status).toBe(401);
    } finally {
      if (saved === undefined) delete process.env.SALTUS_AUTH_CACHE_MS;
      else process.env.SALTUS_AUTH_CACHE_MS = saved;
    }
  });

  describe('sessions and CSRF', () => {
    const login = async (email: string, password: string, headers: Record<string, string> = {}) => {
      const { POST } = (await import('@/app/api/auth/login/route')) as unknown as { POST: Handler };
      return POST(new Request('http://localhost/api/auth/login', { method: 'POST', body: JSON.stringify({ email, password }), headers: { 'content-type': 'application/json', ...headers } }), {
        params: Promise.resolve({}),
      });
    };
    const cookiesOf = (res: Response) => Object.fromEntries(res.headers.getSetCookie().map((c) => c.split(';')[0]!.split('=') as [string, string]));
    const spec = JSON.stringify({ name: 'Signed-in campaign', factors: [{ name: 'a', kind: 'continuous', low: 0, high: 1 }], responses: [{ name: 'y', goal: 'maximize' }] });

    it('a cookie-signed change needs the x-csrf-token header; a Bearer token does not', async () => {
      const user = await userFor('planner');
      const res = await login(user.email, user.password);
      expect(res.status).toBe(200);
      const set = res.headers.getSetCookie().join('\n');
      expect(set).toMatch(/saltus_session=[^;]+; Path=\/; SameSite=Lax; HttpOnly/);
      const c = cookiesOf(res);
      const cookie = `saltus_session=${c.saltus_session}; saltus_csrf=${c.saltus_csrf}`;
      const create = handlers.get('POST /api/v1/campaigns')!;
      const post = (headers: Record<string, string>) =>
        create(new Request('http://localhost/api/v1/campaigns', { method: 'POST', body: spec, headers: { 'content-type': 'application/json', host: 'localhost', ...headers } }), { params: Promise.resolve({}) });

      const without = await post({ cookie });
      expect(without.status).toBe(403);
      expect(((await without.json()) as { error: { code: string; field: string } }).error).toMatchObject({ code: 'csrf', field: 'x-csrf-token' });
      expect((await post({ cookie, 'x-csrf-token': 'forged' })).status).toBe(403);
      expect((await post({ cookie, 'x-csrf-token': c.saltus_csrf!, origin: 'http://evil.example' })).status).toBe(403);
      const ok = await post({ cookie, 'x-csrf-token': c.saltus_csrf!, origin: 'http://localhost' });
      expect(ok.status).toBe(201);
      expect((await post(bearer(tokens.planner))).status).toBe(201);

      // the audit trail names the person and the token, not a placeholder
      const client = await db();
      const actors = (await client.auditEvent.findMany({ where: { action: 'create', entity: 'campaign' } })).map((e) => e.actor);
      expect(actors).toContain(user.email);
      expect(actors.some((a) => a.startsWith('token:test-planner'))).toBe(true);

      // reading needs no CSRF header
      const list = handlers.get('GET /api/v1/campaigns')!;
      expect((await list(new Request('http://localhost/api/v1/campaigns', { headers: { cookie } }), { params: Promise.resolve({}) })).status).toBe(200);

      // logging out deletes the session: the cookie no longer works
      const { POST: logout } = (await import('@/app/api/auth/logout/route')) as unknown as { POST: Handler };
      const out = await logout(new Request('http://localhost/api/auth/logout', { method: 'POST', headers: { cookie } }), { params: Promise.resolve({}) });
      expect(out.status).toBe(200);
      expect(out.headers.getSetCookie().join('\n')).toMatch(/saltus_session=; .*Max-Age=0/);
      expect(await client.session.count({ where: { user: { email: user.email } } })).toBe(0);
      const after = await list(new Request('http://localhost/api/v1/campaigns', { headers: { cookie } }), { params: Promise.resolve({}) });
      expect(after.status).toBe(401);
    });

    it('refuses a wrong password and a disabled account; stores only a SHA-256 of the cookie', async () => {
      const user = await userFor('viewer');
      const wrong = await login(user.email, 'not the password at all');
      expect(wrong.status).toBe(401);
      expect(((await wrong.json()) as { error: { field: string } }).error.field).toBe('password');
      const ok = await login(user.email, user.password);
      const secret = cookiesOf(ok).saltus_session!;
      const client = await db();
      const rows = await client.session.findMany({ where: { user: { email: user.email } } });
      expect(rows).toHaveLength(1);
      expect(rows[0]!.tokenHash).not.toContain(secret);
      expect(rows[0]!.tokenHash).toMatch(/^[0-9a-f]{64}$/);
      await disableUser(user.email, 'test');
      const list = handlers.get('GET /api/v1/campaigns')!;
      expect((await list(new Request('http://localhost/api/v1/campaigns', { headers: { cookie: `saltus_session=${secret}` } }), { params: Promise.resolve({}) })).status).toBe(401);
      expect((await login(user.email, user.password)).status).toBe(401);
    });
  });
});
