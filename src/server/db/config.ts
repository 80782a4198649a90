/**
 * Which database to use: PostgreSQL when DATABASE_URL is a postgresql:// URL, otherwise the embedded
 * SQLite file (data/saltus.db, or SALTUS_SQLITE_FILE), created on first start.
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';

export type DatabaseConfig =
  | { provider: 'sqlite'; filePath: string; url: string }
  | { provider: 'postgresql'; url: string };

export function databaseConfig(env: Record<string, string | undefined> = process.env): DatabaseConfig {
  const url = env.DATABASE_URL;
  if (url && /^postgres(ql)?:\/\//.test(url)) return { provider: 'postgresql', url };
  if (url && !url.startsWith('file:')) {
    throw new Error('DATABASE_URL must be a postgresql:// URL or a file: URL for SQLite');
  }
  const filePath = path.resolve(url ? url.slice('file:'.length) : (env.SALTUS_SQLITE_FILE ?? path.join('data', 'saltus.db')));
  mkdirSync(path.dirname(filePath), { recursive: true });
  return { provider: 'sqlite', filePath, url: `file:${filePath}` };
}
