/**
 * Applies the committed migrations to the configured database at start-up, without Prisma's native
 * engine. Each migration folder's migration.sql runs once, in name order, inside a transaction, and
 * is recorded in Prisma's own `_prisma_migrations` table with the same checksum Prisma computes, so a
 * machine that has the native engine can use `prisma migrate deploy` / `status` on the same database.
 */
import { createHash, randomUUID } from 'node:crypto';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { databaseConfig, type DatabaseConfig } from './config';

export interface MigrationFile {
  name: string;
  sql: string;
  checksum: string;
}

export function migrationFiles(config: DatabaseConfig, root = process.cwd()): MigrationFile[] {
  const dir = config.provider === 'sqlite' ? path.join(root, 'prisma', 'migrations') : path.join(root, 'prisma', 'postgresql', 'migrations');
  if (!existsSync(dir)) throw new Error(`no migrations folder at ${path.relative(root, dir)}`);
  return readdirSync(dir, { withFileTypes: true })
    .filter((d) => d.isDirectory() && existsSync(path.join(dir, d.name, 'migration.sql')))
    .map((d) => d.name)
    .sort()
    .map((name) => {
      const sql = readFileSync(path.join(dir, name, 'migration.sql'), 'utf8');
      return { name, sql, checksum: createHash('sha256').update(sql).digest('hex') };
    });
}

const SQLITE_TABLE = `CREATE TABLE IF NOT EXISTS "_prisma_migrations" (
  "id" TEXT PRIMARY KEY NOT NULL, "checksum" TEXT NOT NULL, "finished_at" DATETIME, "migration_name" TEXT NOT NULL,
  "logs" TEXT, "rolled_back_at" DATETIME, "started_at" DATETIME NOT NULL DEFAULT current_timestamp,
  "applied_steps_count" INTEGER UNSIGNED NOT NULL DEFAULT 0)`;
const PG_TABLE = `CREATE TABLE IF NOT EXISTS "_prisma_migrations" (
  "id" VARCHAR(36) PRIMARY KEY NOT NULL, "checksum" VARCHAR(64) NOT NULL, "finished_at" TIMESTAMPTZ,
  "migration_name" VARCHAR(255) NOT NULL, "logs" TEXT, "rolled_back_at" TIMESTAMPTZ,
  "started_at" TIMESTAMPTZ NOT NULL DEFAULT now(), "applied_steps_count" INTEGER NOT NULL DEFAULT 0)`;

export interface MigrateResult {
  applied: string[];
  alreadyApplied: number;
}

function checkHistory(files: MigrationFile[], done: Map<string, string>): void {
  for (const [name, checksum] of done) {
    const f = files.find((m) => m.name === name);
    if (!f) throw new Error(`the database has migration ${name}, which this version of Saltus does not know; use a newer version`);
    if (f.checksum !== checksum) throw new Error(`migration ${name} was changed after it was applied; restore its original migration.sql`);
  }
}

export async function migrate(config: DatabaseConfig = databaseConfig(), root = process.cwd()): Promise<MigrateResult> {
  const files = migrationFiles(config, root);
  if (config.provider === 'sqlite') {
    const { default: Database } = await import('better-sqlite3');
    const db = new Database(config.filePath);
    try {
      db.pragma('journal_mode = WAL');
      db.exec(SQLITE_TABLE);
      const rows = db.prepare('SELECT migration_name, checksum FROM _prisma_migrations WHERE finished_at IS NOT NULL AND rolled_back_at IS NULL').all() as { migration_name: string; checksum: string }[];
      const done = new Map(rows.map((r) => [r.migration_name, r.checksum]));
      checkHistory(files, done);
      const applied: string[] = [];
      for (const m of files) {
        if (done.has(m.name)) continue;
        db.transaction(() => {
          db.exec(m.sql);
          db.prepare('INSERT INTO _prisma_migrations (id, checksum, finished_at, migration_name, started_at, applied_steps_count) VALUES (?, ?, ?, ?, ?, 1)')
            .run(randomUUID(), m.checksum, new Date().toISOString(), m.name, new Date().toISOString());
        })();
        applied.push(m.name);
      }
      return { applied, alreadyApplied: done.size };
    } finally {
      db.close();
    }
  }
  const pg = await import('pg');
  const client = new pg.default.Client({ connectionString: config.url });
  await client.connect();
  try {
    // One migrator at a time when several app servers start together.
    await client.query('SELECT pg_advisory_lock(72657301)');
    await client.query(PG_TABLE);
    const { rows } = await client.query<{ migration_name: string; checksum: string }>(
      'SELECT migration_name, checksum FROM _prisma_migrations WHERE finished_at IS NOT NULL AND rolled_back_at IS NULL',
    );
    const done = new Map(rows.map((r) => [r.migration_name, r.checksum]));
    checkHistory(files, done);
    const applied: string[] = [];
    for (const m of files) {
      if (done.has(m.name)) continue;
      await client.query('BEGIN');
      try {
        await client.query(m.sql);
        await client.query(
          'INSERT INTO _prisma_migrations (id, checksum, finished_at, migration_name, started_at, applied_steps_count) VALUES ($1, $2, now(), $3, now(), 1)',
          [randomUUID(), m.checksum, m.name],
        );
        await client.query('COMMIT');
      } catch (e) {
        await client.query('ROLLBACK');
        throw e;
      }
      applied.push(m.name);
    }
    return { applied, alreadyApplied: done.size };
  } finally {
    await client.query('SELECT pg_advisory_unlock(72657301)').catch(() => {});
    await client.end();
  }
}
