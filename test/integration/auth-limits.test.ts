/**
 * Rate limits: failed sign-ins per account and per client address, and the token bucket of the heavy
 * computations per principal. Each answers 429 with Retry-After and a message saying when to retry.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { resetRateLimits } from '@/server/auth/rate-limit';
import { closeDb } from '@/server/db/client';
import { bearer, tokenFor, userFor } from '../support/auth';
import { freshDatabase } from './database';

type Handler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;
const noParams = { params: Promise.resolve({}) };

describe('rate limits', () => {
  let login: Handler;
  let designs: Handler;
  const saved = { ...process.env };

  beforeAll(async () => {
    await freshDatabase();
    login = ((await import('@/app/api/auth/login/route')) as unknown as { POST: Handler }).POST;
    designs = ((await import('@/app/api/v1/designs/route')) as unknown as { POST: Handler }).POST;
  });
  afterAll(async () => {
    for (const name of ['SALTUS_LOGIN_MAX_FAILURES', 'SALTUS_HEAVY_BURST', 'SALTUS_HEAVY_PER_MINUTE']) {
      if (saved[name] === undefined) delete process.env[name];
      else process.env[name] = saved[name];
    }
    resetRateLimits();
    await closeDb();
  });

  const attempt = (email: string, password: string, address: string) =>
    login(new Request('http://localhost/api/auth/login', { method: 'POST', body: JSON.stringify({ email, password }), headers: { 'x-forwarded-for': address } }), noParams);

  it('blocks an account after 5 failed sign-ins, even with the right password, with Retry-After', async () => {
    delete process.env.SALTUS_LOGIN_MAX_FAILURES; // the default, 5 in 15 minutes
    resetRateLimits();
    const user = await userFor('viewer');
    for (let i = 0; i < 5; i++) expect((await attempt(user.email, `wrong guess ${i}!!`, `10.0.0.${i}`)).status).toBe(401);
    const blocked = await attempt(user.email, user.password, '10.0.0.99');
    expect(blocked.status).toBe(429);
    const retry = Number(blocked.headers.get('retry-after'));
    expect(retry).toBeGreaterThan(0);
    expect(retry).toBeLessThanOrEqual(15 * 60);
    const err = ((await blocked.json()) as { error: { code: string; message: string } }).error;
    expect(err.code).toBe('rate_limited');
    expect(err.message).toMatch(/try again in \d+ s/);
  });

  it('blocks a client address after 5 failures across different accounts', async () => {
    resetRateLimits();
    const user = await userFor('viewer');
    for (let i = 0; i < 5; i++) expect((await attempt(`nobody${i}@test.example`, 'some password here', '10.9.9.9')).status).toBe(401);
    expect((await attempt(user.email, user.password, '10.9.9.9')).status).toBe(429);
    expect((await attempt(user.email, user.password, '10.9.9.10')).status).toBe(200);
  });

  it('limits heavy computations per principal with a token bucket', async () => {
    process.env.SALTUS_HEAVY_BURST = '3';
    process.env.SALTUS_HEAVY_PER_MINUTE = '1';
    resetRateLimits();
    const a = bearer(await tokenFor('planner'));
    const b = bearer(await tokenFor('planner'));
    const post = (headers: Record<string, string>) => designs(new Request('http://localhost/api/v1/designs', { method: 'POST', body: '{}', headers }), noParams);
    for (let i = 0; i < 3; i++) expect((await post(a)).status).toBe(400);
    const limited = await post(a);
    expect(limited.status).toBe(429);
    expect(Number(limited.headers.get('retry-after'))).toBeGreaterThanOrEqual(1);
    expect((await post(b)).status).toBe(400); // another principal has its own bucket
  });
});
