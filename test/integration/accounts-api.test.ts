/**
 * People and API tokens through the JSON API (the accounts page's routes), on the real database:
 *  - an admin adds, lists and disables people; a duplicate e-mail and a weak password are refused
 *    naming the field, and nothing is stored; a disabled person's session and token stop working;
 *  - a signed-in admin cannot disable their own account (refused naming `email`);
 *  - a token's secret is in the creating answer only, never in the list; a revoked token gets 401;
 *  - malformed bodies are answered 4xx naming a field, and store nothing;
 *  - viewer, operator and planner get 403 on every one of these routes.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TokenView, UserView } from '@/server/auth/accounts';
import { resetRateLimits } from '@/server/auth/rate-limit';
import { closeDb, db } from '@/server/db/client';
import { bearer, tokenFor, userFor } from '../support/auth';
import { freshDatabase } from './database';

type Handler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;
type ErrorBody = { error: { code: string; message: string; field: string | null } };
const noParams = { params: Promise.resolve({}) };

const ROUTES = {
  'GET /api/v1/users': () => import('@/app/api/v1/users/route'),
  'POST /api/v1/users': () => import('@/app/api/v1/users/route'),
  'POST /api/v1/users/disable': () => import('@/app/api/v1/users/disable/route'),
  'GET /api/v1/tokens': () => import('@/app/api/v1/tokens/route'),
  'POST /api/v1/tokens': () => import('@/app/api/v1/tokens/route'),
  'POST /api/v1/tokens/revoke': () => import('@/app/api/v1/tokens/revoke/route'),
} as const;
type Key = keyof typeof ROUTES;

describe('people and API tokens over the API', () => {
  const handlers = new Map<Key, Handler>();
  let admin: Record<string, string>;

  beforeAll(async () => {
    await freshDatabase();
    resetRateLimits();
    for (const [key, load] of Object.entries(ROUTES) as [Key, () => Promise<Record<string, unknown>>][]) {
      handlers.set(key, (await load())[key.split(' ')[0]!] as Handler);
    }
    admin = bearer(await tokenFor('admin'));
  });
  afterAll(async () => {
    await closeDb();
  });

  /** Calls a route; `body` is sent as JSON for POST. */
  const call = (key: Key, headers: Record<string, string>, body?: unknown) => {
    const [method, path] = key.split(' ') as [string, string];
    return handlers.get(key)!(
      new Request(`http://localhost${path}`, { method, headers: { 'content-type': 'application/json', host: 'localhost', ...headers }, body: method === 'GET' ? undefined : JSON.stringify(body ?? {}) }),
      noParams,
    );
  };
  const users = async () => ((await (await call('GET /api/v1/users', admin)).json()) as { users: UserView[] }).users;
  const tokens = async () => ((await (await call('GET /api/v1/tokens', admin)).json()) as { tokens: TokenView[] }).tokens;

  const login = async (email: string, password: string) => {
    const { POST } = (await import('@/app/api/auth/login/route')) as unknown as { POST: Handler };
    return POST(new Request('http://localhost/api/auth/login', { method: 'POST', body: JSON.stringify({ email, password }), headers: { 'content-type': 'application/json' } }), noParams);
  };
  /** The cookie and CSRF headers of a fresh session. */
  const sessionOf = async (email: string, password: string) => {
    const res = await login(email, password);
    expect(res.status).toBe(200);
    const c = Object.fromEntries(res.headers.getSetCookie().map((s) => s.split(';')[0]!.split('=') as [string, string]));
    return { cookie: `saltus_session=${c.saltus_session}; saltus_csrf=${c.saltus_csrf}`, 'x-csrf-token': c.saltus_csrf! };
  };

  it('creates a person (201, no password in the answer) and lists them', async () => {
    const res = await call('POST /api/v1/users', admin, { email: ' Ada@Lab.Example ', name: 'Ada Example', role: 'planner', password: 'four unrelated words here' });
    expect(res.status).toBe(201);
    const text = await res.text();
    expect(text).not.toMatch(/password|four unrelated/i);
    const u = JSON.parse(text) as UserView;
    expect(u).toMatchObject({ email: 'ada@lab.example', name: 'Ada Example', role: 'planner', disabledAt: null });
    expect(new Date(u.createdAt).getTime()).not.toBeNaN();
    const listed = await users();
    expect(listed.map((x) => x.email)).toContain('ada@lab.example');
    expect(JSON.stringify(listed)).not.toMatch(/passwordHash|argon2/);
    // the audit trail names the token that made the change
    const events = await (await db()).auditEvent.findMany({ where: { entity: 'user', action: 'create', entityId: u.id } });
    expect(events.map((e) => e.actor)[0]).toMatch(/^token:test-admin/);
    // and the person can sign in
    expect((await login('ada@lab.example', 'four unrelated words here')).status).toBe(200);
  });

  it('refuses a duplicate e-mail (409 naming email) and a weak password (400 naming password); nothing is stored', async () => {
    const before = (await users()).length;
    const dup = await call('POST /api/v1/users', admin, { email: 'ADA@lab.example', name: 'Another', role: 'viewer', password: 'another long password' });
    expect(dup.status).toBe(409);
    expect(((await dup.json()) as ErrorBody).error).toMatchObject({ code: 'conflict', field: 'email' });
    const weak = await call('POST /api/v1/users', admin, { email: 'cleo@lab.example', name: 'Cleo Example', role: 'viewer', password: 'short' });
    expect(weak.status).toBe(400);
    const err = ((await weak.json()) as ErrorBody).error;
    expect(err.field).toBe('password');
    expect(err.message).toMatch(/12 characters/);
    const badRole = await call('POST /api/v1/users', admin, { email: 'cleo@lab.example', name: 'Cleo Example', role: 'owner', password: 'a long enough password' });
    expect(badRole.status).toBe(400);
    expect(((await badRole.json()) as ErrorBody).error.field).toBe('role');
    const badMail = await call('POST /api/v1/users', admin, { email: 'not-an-address', name: 'Cleo Example', role: 'viewer', password: 'a long enough password' });
    expect(((await badMail.json()) as ErrorBody).error.field).toBe('email');
    expect((await users()).length).toBe(before);
  });

  it('disables a person: their session and their token stop working, the account stays listed', async () => {
    const person = await userFor('operator', 'correct horse battery staple', 'bram@lab.example');
    const session = await sessionOf(person.email, person.password);
    const { token } = (await (await call('POST /api/v1/tokens', admin, { name: 'bram-laptop', role: 'operator' })).json()) as { token: string };
    // a token owned by the person (the repository's ownership link)
    await (await db()).apiToken.updateMany({ where: { name: 'bram-laptop' }, data: { userId: person.id } });
    const { GET: campaigns } = (await import('@/app/api/v1/campaigns/route')) as unknown as { GET: Handler };
    const list = (headers: Record<string, string>) => campaigns(new Request('http://localhost/api/v1/campaigns', { headers }), noParams);
    expect((await list({ cookie: session.cookie })).status).toBe(200);

    const res = await call('POST /api/v1/users/disable', admin, { email: 'Bram@lab.example' });
    expect(res.status).toBe(200);
    const view = (await res.json()) as UserView;
    expect(view.email).toBe('bram@lab.example');
    expect(view.disabledAt).not.toBeNull();

    expect((await list({ cookie: session.cookie })).status).toBe(401);
    expect((await list(bearer(token))).status).toBe(401);
    expect((await login(person.email, person.password)).status).toBe(401);
    expect((await users()).find((u) => u.email === 'bram@lab.example')?.disabledAt).toBe(view.disabledAt);

    const unknown = await call('POST /api/v1/users/disable', admin, { email: 'nobody@lab.example' });
    expect(unknown.status).toBe(404);
    expect(((await unknown.json()) as ErrorBody).error.field).toBe('email');
    const empty = await call('POST /api/v1/users/disable', admin, {});
    expect(empty.status).toBe(400);
    expect(((await empty.json()) as ErrorBody).error.field).toBe('email');
  });

  it('refuses a signed-in admin disabling their own account, naming email', async () => {
    const me = await userFor('admin', 'correct horse battery staple', 'dana@lab.example');
    const session = await sessionOf(me.email, me.password);
    const res = await call('POST /api/v1/users/disable', session, { email: 'DANA@lab.example' });
    expect(res.status).toBe(409);
    const err = ((await res.json()) as ErrorBody).error;
    expect(err.field).toBe('email');
    expect(err.message).toMatch(/your own account/);
    expect((await users()).find((u) => u.email === me.email)?.disabledAt).toBeNull();
    // the session still works, and the same admin may disable someone else (cookie + CSRF header)
    const other = await userFor('viewer', 'correct horse battery staple', 'temp@lab.example');
    expect((await call('POST /api/v1/users/disable', session, { email: other.email })).status).toBe(200);
    // without the CSRF header a cookie-signed change is refused
    expect((await call('POST /api/v1/users/disable', { cookie: session.cookie }, { email: 'ada@lab.example' })).status).toBe(403);
  });

  it('shows a token secret once: in the creating answer, never in the list; revoking it makes it fail with 401', async () => {
    const res = await call('POST /api/v1/tokens', admin, { name: 'rig-pc', role: 'operator', expiresDays: 90 });
    expect(res.status).toBe(201);
    const created = (await res.json()) as TokenView & { token: string };
    expect(created.token).toMatch(/^saltus_/);
    expect(created).toMatchObject({ name: 'rig-pc', role: 'operator', revokedAt: null });
    expect(created.token.startsWith(created.prefix)).toBe(true);
    expect(new Date(created.expiresAt!).getTime() - new Date(created.createdAt).getTime()).toBeCloseTo(90 * 86_400_000, -4);

    const listText = await (await call('GET /api/v1/tokens', admin)).text();
    expect(listText).toContain('rig-pc');
    expect(listText).not.toContain(created.token);
    expect(listText).not.toMatch(/"token"|tokenHash/);

    const { GET: campaigns } = (await import('@/app/api/v1/campaigns/route')) as unknown as { GET: Handler };
    const list = () => campaigns(new Request('http://localhost/api/v1/campaigns', { headers: bearer(created.token) }), noParams);
    expect((await list()).status).toBe(200);

    const dup = await call('POST /api/v1/tokens', admin, { name: 'rig-pc', role: 'viewer' });
    expect(dup.status).toBe(409);
    expect(((await dup.json()) as ErrorBody).error.field).toBe('name');
    const badName = await call('POST /api/v1/tokens', admin, { name: 'rig pc!', role: 'viewer' });
    expect(badName.status).toBe(400);
    expect(((await badName.json()) as ErrorBody).error.field).toBe('name');
    const badDays = await call('POST /api/v1/tokens', admin, { name: 'rig-2', role: 'viewer', expiresDays: 0 });
    expect(badDays.status).toBe(400);
    expect(((await badDays.json()) as ErrorBody).error.field).toBe('expiresDays');

    const revoked = await call('POST /api/v1/tokens/revoke', admin, { name: 'rig-pc' });
    expect(revoked.status).toBe(200);
    expect(((await revoked.json()) as TokenView).revokedAt).not.toBeNull();
    const refused = await list();
    expect(refused.status).toBe(401);
    expect(((await refused.json()) as ErrorBody).error.message).toMatch(/revoked/);
    expect((await tokens()).find((t) => t.name === 'rig-pc')?.revokedAt).not.toBeNull();

    const again = await call('POST /api/v1/tokens/revoke', admin, { name: 'rig-pc' });
    expect(again.status).toBe(404);
    expect(((await again.json()) as ErrorBody).error.field).toBe('name');
  });

  it('answers malformed bodies with 400 naming a field, never 5xx, and stores nothing', async () => {
    const before = { users: (await users()).length, tokens: (await tokens()).length };
    const raw = (key: Key, text: string) => {
      const [method, path] = key.split(' ') as [string, string];
      return handlers.get(key)!(new Request(`http://localhost${path}`, { method, headers: { 'content-type': 'application/json', ...admin }, body: text }), noParams);
    };
    const posts = (Object.keys(ROUTES) as Key[]).filter((k) => k.startsWith('POST'));
    for (const key of posts) {
      for (const text of ['', '{', 'null', '[]', '"x"', '{"email": 5, "name": ["a"], "role": null, "password": {}, "expiresDays": "9"}', JSON.stringify({ email: 'x'.repeat(5000), name: '\u0000', role: 'admin', password: 'p'.repeat(2000) })]) {
        const res = await raw(key, text);
        expect(res.status, `${key} with ${text.slice(0, 40)}`).toBeGreaterThanOrEqual(400);
        expect(res.status, `${key} with ${text.slice(0, 40)}`).toBeLessThan(500);
        expect(((await res.json()) as ErrorBody).error.field, `${key} with ${text.slice(0, 40)}`).toBeTruthy();
      }
    }
    expect((await users()).length).toBe(before.users);
    expect((await tokens()).length).toBe(before.tokens);
  });

  it('answers 403 to viewer, operator and planner on every route, 401 without credentials', async () => {
    const bodies: Partial<Record<Key, unknown>> = {
      'POST /api/v1/users': { email: 'outsider@lab.example', name: 'Outsider Example', role: 'admin', password: 'a long enough password' },
      'POST /api/v1/users/disable': { email: 'ada@lab.example' },
      'POST /api/v1/tokens': { name: 'sneaky', role: 'admin' },
      'POST /api/v1/tokens/revoke': { name: 'bram-laptop' },
    };
    for (const role of ['viewer', 'operator', 'planner'] as const) {
      const headers = bearer(await tokenFor(role));
      for (const key of Object.keys(ROUTES) as Key[]) {
        const res = await call(key, headers, bodies[key]);
        expect(res.status, `${key} as ${role}`).toBe(403);
        expect(((await res.json()) as ErrorBody).error.code).toBe('forbidden');
      }
      // a signed-in planner is refused the same way
      if (role === 'planner') {
        const p = await userFor('planner', 'correct horse battery staple', 'plan@lab.example');
        const session = await sessionOf(p.email, p.password);
        for (const key of Object.keys(ROUTES) as Key[]) expect((await call(key, session, bodies[key])).status, `${key} as signed-in planner`).toBe(403);
      }
    }
    for (const key of Object.keys(ROUTES) as Key[]) expect((await call(key, {}, bodies[key])).status, `${key} anonymous`).toBe(401);
    // nothing was changed by the refused calls
    expect((await users()).some((u) => u.email === 'outsider@lab.example')).toBe(false);
    expect((await tokens()).some((t) => t.name === 'sneaky')).toBe(false);
    expect((await users()).find((u) => u.email === 'ada@lab.example')?.disabledAt).toBeNull();
  });
});
