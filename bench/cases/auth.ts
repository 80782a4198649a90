/**
 * Auth check per API request: the gate every route passes (src/server/auth/guard.ts) — permission
 * table lookup, SHA-256 of the Bearer token or session secret, one lookup by the unique hash index on a
 * SQLite file, role comparison (and the CSRF HMAC for a cookie-signed change). 1,000 checks per run;
 * the report gives the time per check. No reference implementation: the figure is read against the
 * rig log's target of p99 < 50 ms per request, of which this check should take a small part.
 */
import { mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createToken, createUser } from '../../src/server/auth/accounts';
import { guard } from '../../src/server/auth/guard';
import { openSession } from '../../src/server/auth/sessions';
import { db } from '../../src/server/db/client';
import { databaseConfig } from '../../src/server/db/config';
import { migrate } from '../../src/server/db/migrate';
import type { BenchCase } from '../types';

const CHECKS = 1000;

interface Prepared {
  token: string;
  cookie: string;
  csrf: string;
}

let prepared: Promise<Prepared> | null = null;

function setup(): Promise<Prepared> {
  prepared ??= (async () => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), 'saltus-bench-auth-')), 'auth.db');
    process.env.DATABASE_URL = `file:${file}`;
    process.env.SALTUS_SQLITE_FILE = file;
    await migrate(databaseConfig(), process.cwd());
    const { token } = await createToken({ name: 'bench', role: 'operator' }, 'bench');
    const user = await createUser({ email: 'bench@bench.invalid', name: 'Bench', role: 'operator', password: 'bench-password-long-enough' }, 'bench');
    const client = await db();
    const row = await client.user.findUniqueOrThrow({ where: { email: user.email } });
    const { secret, csrf } = await openSession(row.id, 'bench');
    return { token, cookie: `saltus_session=${secret}`, csrf };
  })();
  return prepared;
}

async function checks(make: () => Request): Promise<number> {
  let ok = 0;
  for (let i = 0; i < CHECKS; i++) if (!((await guard(make())) instanceof Response)) ok += 1;
  if (ok !== CHECKS) throw new Error(`only ${ok} of ${CHECKS} checks passed`);
  return ok;
}

const url = 'http://127.0.0.1/api/v1/campaigns/c1/trials/log';

export const cases: BenchCase[] = [
  {
    name: `auth: ${CHECKS} Bearer-token checks of POST …/trials/log (SQLite)`,
    target: '≤ 0.5 ms per check (≤ 0.5 s per run)',
    targetSeconds: 0.5,
    setup,
    run: (p) => checks(() => new Request(url, { method: 'POST', headers: { authorization: `Bearer ${(p as Prepared).token}` } })),
    warmup: 1,
    repeats: 5,
  },
  {
    name: `auth: ${CHECKS} session-cookie checks of POST …/trials/log with the CSRF header (SQLite)`,
    target: '≤ 0.5 ms per check (≤ 0.5 s per run)',
    targetSeconds: 0.5,
    setup,
    run: (p) => {
      const { cookie, csrf } = p as Prepared;
      return checks(() => new Request(url, { method: 'POST', headers: { cookie, 'x-csrf-token': csrf, host: '127.0.0.1' } }));
    },
    warmup: 1,
    repeats: 5,
  },
];
