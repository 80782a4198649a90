/**
 * Shared set-up of the integration suite: the database named by the environment (a SQLite file from
 * SALTUS_SQLITE_FILE / DATABASE_URL=file:..., or PostgreSQL from DATABASE_URL=postgresql://...),
 * wiped and migrated from scratch. Call `freshDatabase()` in a file's beforeAll and `closeDb()` in its
 * afterAll; the files of the suite run one after another on the same database.
 */
import { existsSync, rmSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { closeDb } from '@/server/db/client';
import { databaseConfig, type DatabaseConfig } from '@/server/db/config';
import { migrate } from '@/server/db/migrate';

export const repoRoot = fileURLToPath(new URL('../..', import.meta.url));

/** Drops every table of the configured database (which must be a test database). */
export async function wipeDatabase(config: DatabaseConfig = databaseConfig()): Promise<void> {
  await closeDb();
  if (config.provider === 'sqlite') {
    if (path.resolve(config.filePath) === path.resolve(repoRoot, 'data', 'saltus.db')) {
      throw new Error('refusing to wipe data/saltus.db: set SALTUS_SQLITE_FILE to a test file');
    }
    for (const suffix of ['', '-wal', '-shm', '-journal']) {
      if (existsSync(config.filePath + suffix)) rmSync(config.filePath + suffix);
    }
    return;
  }
  const { default: pg } = await import('pg');
  const client = new pg.Client({ connectionString: config.url });
  await client.connect();
  try {
    await client.query('DROP SCHEMA IF EXISTS public CASCADE');
    await client.query('CREATE SCHEMA public');
  } finally {
    await client.end();
  }
}

/** An empty database with every migration applied. */
export async function freshDatabase(): Promise<DatabaseConfig> {
  const config = databaseConfig();
  await wipeDatabase(config);
  await migrate(config, repoRoot);
  return config;
}
