/**
 * The one Prisma client of the process. SQLite through better-sqlite3 (WAL mode, synchronous=FULL so
 * an acknowledged write survives a crash or power loss), or PostgreSQL through pg, per DATABASE_URL.
 * Both generated clients expose the same model API; the SQLite one's types are used throughout.
 */
import { PrismaBetterSqlite3 } from '@prisma/adapter-better-sqlite3';
import { PrismaClient } from '@/generated/sqlite/client';
import { databaseConfig } from './config';

export type Db = PrismaClient;

const globalForDb = globalThis as unknown as { saltusDb?: Promise<Db> };

async function createClient(): Promise<Db> {
  const config = databaseConfig();
  if (config.provider === 'postgresql') {
    const [{ PrismaPg }, pgClient] = await Promise.all([import('@prisma/adapter-pg'), import('@/generated/postgresql/client')]);
    const adapter = new PrismaPg({ connectionString: config.url, max: Number(process.env.SALTUS_PG_POOL ?? 10) });
    return new pgClient.PrismaClient({ adapter }) as unknown as Db;
  }
  const adapter = new PrismaBetterSqlite3({ url: config.url, timeout: 10_000 });
  const client = new PrismaClient({ adapter });
  // WAL with synchronous=FULL: a commit is on disk before it is acknowledged (NORMAL could lose the
  // last transactions on power loss). busy_timeout lets concurrent writers queue instead of failing.
  await client.$queryRawUnsafe('PRAGMA journal_mode = WAL');
  await client.$queryRawUnsafe('PRAGMA synchronous = FULL');
  await client.$queryRawUnsafe('PRAGMA foreign_keys = ON');
  await client.$queryRawUnsafe('PRAGMA busy_timeout = 10000');
  return client;
}

export function db(): Promise<Db> {
  globalForDb.saltusDb ??= createClient();
  return globalForDb.saltusDb;
}

export async function closeDb(): Promise<void> {
  const p = globalForDb.saltusDb;
  globalForDb.saltusDb = undefined;
  if (p) await (await p).$disconnect();
}
