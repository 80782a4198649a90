/**
 * Backup and restore round trip on the configured database: seed the demo campaign (every table gets
 * rows, audit included), back up, wipe, restore, and compare every table row for row. A restore into
 * a database that already has rows is refused and changes nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createArchive, decodeArchive, encodeArchive, restoreArchive, TABLES } from '@/server/backup/archive';
import { closeDb, db } from '@/server/db/client';
import { seedDemo } from '../../scripts/seed';
import { freshDatabase } from './database';

describe('backup and restore', () => {
  beforeAll(async () => {
    await freshDatabase();
    await seedDemo({ now: new Date('2026-03-04T12:00:00Z') });
    const client = await db();
    await client.user.create({ data: { email: 'planner@example.invalid', name: 'Test planner', role: 'planner', passwordHash: 'not-a-real-hash' } });
  });
  afterAll(async () => {
    await closeDb();
  });

  it('round-trips every table exactly', async () => {
    const before = await createArchive();
    expect(before.tables.auditEvent.length).toBeGreaterThan(10);
    expect(before.tables.observation.length).toBeGreaterThan(10);
    const bytes = encodeArchive(before);
    await expect(restoreArchive(decodeArchive(bytes))).rejects.toThrow(/empty database/);
    await freshDatabase();
    const counts = await restoreArchive(decodeArchive(bytes));
    for (const [name] of TABLES) expect(counts[name]).toBe(before.tables[name].length);
    const after = await createArchive();
    for (const [name] of TABLES) {
      expect(JSON.parse(JSON.stringify(after.tables[name])), name).toEqual(JSON.parse(JSON.stringify(before.tables[name])));
    }
  });

  it('refuses a file that is not a backup', () => {
    expect(() => decodeArchive(Buffer.from('hello'))).toThrow(/not a Saltus backup/);
  });
});
