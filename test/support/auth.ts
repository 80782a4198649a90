/**
 * Credentials for tests that call route handlers: every /api/v1 route checks them (there is no switch
 * that turns the check off). `tokenFor(role)` creates an API token in the current test database and
 * returns it; `bearer(token)` is the header to send. Unit tests that call routes first get a
 * throw-away SQLite database from `unitDatabase()` (never data/saltus.db, never a DATABASE_URL of the
 * shell). Importing this module raises the heavy-computation rate limit, which fuzz tests would hit
 * otherwise; test/integration/auth-limits.test.ts proves the limits with their own settings.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createToken, createUser } from '@/server/auth/accounts';
import type { Role } from '@/server/auth/roles';
import { databaseConfig } from '@/server/db/config';
import { migrate } from '@/server/db/migrate';

process.env.SALTUS_HEAVY_BURST ??= '1000000';
process.env.SALTUS_HEAVY_PER_MINUTE ??= '1000000';

const repoRoot = fileURLToPath(new URL('../..', import.meta.url));
let serial = 0;

/** A new API token with the role, in the database the process uses. */
export async function tokenFor(role: Role = 'admin'): Promise<string> {
  serial += 1;
  const { token } = await createToken({ name: `test-${role}-${process.pid}-${serial}-${Date.now()}`, role }, 'test-setup');
  return token;
}

export const bearer = (token: string): Record<string, string> => ({ authorization: `Bearer ${token}` });

/** A person's account (password of 12+ characters) in the current database. */
export async function userFor(role: Role, password = 'correct horse battery staple', email = `${role}-${serial++}@test.example`) {
  return { ...(await createUser({ email, name: `Test ${role}`, role, password }, 'test-setup')), password };
}

/** Points this process at a fresh, migrated SQLite file in the temp directory (unit tests of routes). */
export async function unitDatabase(): Promise<void> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'saltus-unit-'));
  const file = path.join(dir, 'unit.db');
  process.env.DATABASE_URL = `file:${file}`;
  process.env.SALTUS_SQLITE_FILE = file;
  process.once('exit', () => rmSync(dir, { recursive: true, force: true }));
  await migrate(databaseConfig(), repoRoot);
}

type RouteHandler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;
let shared: Promise<string> | null = null;

/**
 * A route handler that sends an admin token with every request (created on first use). Use as
 * `const POST = signed(routePOST)`; the request is otherwise sent as given.
 */
export function signed(handler: RouteHandler, role: Role = 'admin') {
  return async (req: Request, ctx: { params: Promise<Record<string, string>> } = { params: Promise.resolve({}) }): Promise<Response> => {
    const token = role === 'admin' ? await (shared ??= tokenFor('admin')) : await tokenFor(role);
    const headers = new Headers(req.headers);
    headers.set('authorization', `Bearer ${token}`);
    const body = req.method === 'GET' || req.method === 'HEAD' ? undefined : await req.arrayBuffer();
    return handler(new Request(req.url, { method: req.method, headers, body }), ctx);
  };
}
