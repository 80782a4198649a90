/**
 * Backup and restore of every table, audit trail included, as one gzip-compressed JSON archive.
 * The archive is database-neutral: a backup of SQLite restores into PostgreSQL and back.
 * Restore only writes into an empty database, in one transaction, so a failed restore leaves
 * nothing half-loaded.
 */
import { gunzipSync, gzipSync } from 'node:zlib';
import { db, type Db } from '@/server/db/client';

/** Tables in an order that respects foreign keys, with their date-time columns. */
export const TABLES = [
  ['user', ['createdAt', 'disabledAt']],
  ['session', ['createdAt', 'expiresAt', 'lastSeenAt']],
  ['apiToken', ['createdAt', 'expiresAt', 'lastUsedAt', 'revokedAt']],
  ['campaign', ['createdAt', 'updatedAt']],
  ['factor', []],
  ['response', []],
  ['robot', []],
  ['rig', []],
  ['design', ['createdAt']],
  ['run', ['createdAt']],
  ['slot', ['start', 'end']],
  ['trial', ['startedAt', 'finishedAt', 'createdAt']],
  ['observation', []],
  ['track', ['createdAt']],
  ['amendment', ['createdAt']],
  ['analysis', ['createdAt']],
  ['suggestion', ['createdAt']],
  ['job', ['createdAt', 'startedAt', 'finishedAt']],
  ['auditEvent', ['at']],
] as const;

type TableName = (typeof TABLES)[number][0];
type Row = Record<string, unknown>;

export interface Archive {
  format: 'saltus-backup';
  version: 1;
  createdAt: string;
  tables: Record<TableName, Row[]>;
}

// Every model delegate has findMany/createMany/count; the generated types differ per model.
type Delegate = {
  findMany(args?: unknown): Promise<Row[]>;
  createMany(args: { data: Row[] }): Promise<{ count: number }>;
  count(): Promise<number>;
};
const delegate = (client: Db | Parameters<Parameters<Db['$transaction']>[0]>[0], name: TableName) =>
  (client as unknown as Record<string, Delegate>)[name]!;

export async function createArchive(now = new Date()): Promise<Archive> {
  const client = await db();
  const tables = {} as Record<TableName, Row[]>;
  for (const [name] of TABLES) tables[name] = await delegate(client, name).findMany({ orderBy: { id: 'asc' } });
  return { format: 'saltus-backup', version: 1, createdAt: now.toISOString(), tables };
}

export function encodeArchive(a: Archive): Buffer {
  return gzipSync(Buffer.from(JSON.stringify(a)));
}

export function decodeArchive(bytes: Buffer): Archive {
  let a: Archive;
  try {
    a = JSON.parse(gunzipSync(bytes).toString('utf8')) as Archive;
  } catch {
    throw new Error('the file is not a Saltus backup (expected a gzip-compressed JSON archive)');
  }
  if (a?.format !== 'saltus-backup' || a.version !== 1) throw new Error('the file is not a Saltus backup of a version this program reads');
  return a;
}

export async function restoreArchive(a: Archive): Promise<Record<string, number>> {
  const client = await db();
  for (const [name] of TABLES) {
    if ((await delegate(client, name).count()) > 0) {
      throw new Error(`restore needs an empty database, but table ${name} has rows; restore into a fresh database`);
    }
  }
  const counts: Record<string, number> = {};
  await client.$transaction(
    async (tx) => {
      for (const [name, dates] of TABLES) {
        const rows = (a.tables[name] ?? []).map((r) => {
          const copy: Row = { ...r };
          for (const d of dates) if (typeof copy[d] === 'string') copy[d] = new Date(copy[d] as string);
          return copy;
        });
        for (let i = 0; i < rows.length; i += 500) await delegate(tx, name).createMany({ data: rows.slice(i, i + 500) });
        counts[name] = rows.length;
      }
    },
    { timeout: 600_000, maxWait: 60_000 },
  );
  return counts;
}
