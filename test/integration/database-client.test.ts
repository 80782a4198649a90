/**
 * The database client on the database the environment names: the suite really runs on PostgreSQL when
 * DATABASE_URL says so (not on SQLite twice), SQLite gets its durability settings, and the health route
 * answers from a migrated database.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GET as health } from '@/app/api/health/route';
import { closeDb, db } from '@/server/db/client';
import { databaseConfig } from '@/server/db/config';
import { freshDatabase } from './database';

const config = databaseConfig();

describe(`database client on ${config.provider}`, () => {
  beforeAll(async () => {
    await freshDatabase();
  });
  afterAll(async () => {
    await closeDb();
  });

  it('connects to the database DATABASE_URL / SALTUS_SQLITE_FILE names', async () => {
    const expected = /^postgres(ql)?:\/\//.test(process.env.DATABASE_URL ?? '') ? 'postgresql' : 'sqlite';
    expect(config.provider).toBe(expected);
    const client = await db();
    if (config.provider === 'postgresql') {
      const [row] = await client.$queryRawUnsafe<{ version: string }[]>('SELECT version() AS version');
      expect(row.version).toMatch(/^PostgreSQL /);
    } else {
      const [row] = await client.$queryRawUnsafe<{ file: string }[]>("SELECT file FROM pragma_database_list WHERE name = 'main'");
      expect(row.file).toBe(config.filePath);
    }
  });

  it.runIf(config.provider === 'sqlite')('opens SQLite in WAL mode with synchronous=FULL and foreign keys on', async () => {
    const client = await db();
    const pragma = async (name: string) => {
      const [row] = await client.$queryRawUnsafe<Record<string, unknown>[]>(`PRAGMA ${name}`);
      return String(Object.values(row)[0]);
    };
    expect(await pragma('journal_mode')).toBe('wal');
    expect(await pragma('synchronous')).toBe('2'); // 2 = FULL
    expect(await pragma('foreign_keys')).toBe('1');
  });

  it('keeps a write when one statement of a transaction fails (all or nothing)', async () => {
    const client = await db();
    await expect(
      client.$transaction(async (tx) => {
        await tx.campaign.create({ data: { name: 'rolled back' } });
        await tx.factor.create({ data: { campaignId: 'no-such-campaign', position: 0, name: 'x', kind: 'continuous' } });
      }),
    ).rejects.toThrow();
    expect(await client.campaign.count({ where: { name: 'rolled back' } })).toBe(0);
  });

  it('GET /api/health answers {"status":"ok"} from the migrated database', async () => {
    const res = await health();
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ status: 'ok' });
    expect([1, 2]).toContain(body.analysisThreads);
  });
});
