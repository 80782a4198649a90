/**
 * The one Prisma client of the process. SQLite through better-sqlite3 (WAL mode, synchronous=FULL so
 * an acknowledged write survives a crash or power loss), or PostgreSQL through pg, per DATABASE_URL.
 * Both generated clients expose the same model API; the SQLite one's types are used throughout.
 */
import { PrismaBetterSqlite3 } from '@prisma/adapter-better-sqlite3';
import type BetterSqlite3 from 'better-sqlite3';
import { PrismaClient } from '@/generated/sqlite/client';
import { databaseConfig } from './config';

export type Db = PrismaClient;
/** The better-sqlite3 connection under the Prisma client (SQLite only). */
export type SqliteConnection = BetterSqlite3.Database;

const globalForDb = globalThis as unknown as { saltusDb?: Promise<Db>; saltusSqlite?: SqliteConnection | null };

function isSqliteConnection(x: unknown): x is SqliteConnection {
  const c = x as Partial<SqliteConnection> | null;
  return !!c && typeof c.prepare === 'function' && typeof c.exec === 'function' && typeof c.inTransaction === 'boolean';
}

/**
 * Prisma's better-sqlite3 adapter opens one connection; keep a handle on it so that the trial-log hot
 * path can run prepared statements on the very same connection (never a second writer beside Prisma).
 */
function capturingFactory(factory: PrismaBetterSqlite3): PrismaBetterSqlite3 {
  const connect = factory.connect.bind(factory);
  factory.connect = async () => {
    const adapter = await connect();
    const conn = (adapter as unknown as { client?: unknown }).client;
    globalForDb.saltusSqlite = isSqliteConnection(conn) ? conn : null;
    return adapter;
  };
  return factory;
}

async function createClient(): Promise<Db> {
  const config = databaseConfig();
  if (config.provider === 'postgresql') {
    const [{ PrismaPg }, pgClient] = await Promise.all([import('@prisma/adapter-pg'), import('@/generated/postgresql/client')]);
    const adapter = new PrismaPg({ connectionString: config.url, max: Number(process.env.SALTUS_PG_POOL ?? 10) });
    return new pgClient.PrismaClient({ adapter }) as unknown as Db;
  }
  const adapter = capturingFactory(new PrismaBetterSqlite3({ url: config.url, timeout: 10_000 }));
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

/**
 * The SQLite connection Prisma uses, for prepared statements on hot paths; null on PostgreSQL (or if
 * the adapter does not expose it, in which case callers use Prisma).
 */
export async function sqliteConnection(): Promise<SqliteConnection | null> {
  await db();
  const conn = globalForDb.saltusSqlite;
  return conn && conn.open ? conn : null;
}

export async function closeDb(): Promise<void> {
  const p = globalForDb.saltusDb;
  globalForDb.saltusDb = undefined;
  globalForDb.saltusSqlite = undefined;
  if (p) await (await p).$disconnect();
}
