/**
 * `npm run saltus -- <command>`: administration from the command line.
 *   backup [file]    write every table, audit trail included, to one archive (default backups/saltus-<time>.json.gz)
 *   restore <file>   load an archive into an empty database (SQLite or PostgreSQL, per DATABASE_URL)
 *   migrate          apply pending migrations
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { createArchive, decodeArchive, encodeArchive, restoreArchive } from '../src/server/backup/archive';
import { closeDb } from '../src/server/db/client';
import { databaseConfig } from '../src/server/db/config';
import { migrate } from '../src/server/db/migrate';

async function main(argv: string[]): Promise<number> {
  const [command, ...args] = argv;
  switch (command) {
    case 'backup': {
      const file = args[0] ?? path.join('backups', `saltus-${new Date().toISOString().replace(/[:.]/g, '-')}.json.gz`);
      mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
      const archive = await createArchive();
      writeFileSync(file, encodeArchive(archive));
      const rows = Object.values(archive.tables).reduce((s, t) => s + t.length, 0);
      console.log(`backup: ${rows} rows in ${Object.keys(archive.tables).length} tables written to ${file}`);
      return 0;
    }
    case 'restore': {
      if (!args[0]) {
        console.error('restore: give the archive file, e.g. npm run saltus -- restore backups/saltus-….json.gz');
        return 2;
      }
      await migrate(databaseConfig());
      const counts = await restoreArchive(decodeArchive(readFileSync(args[0])));
      console.log(`restore: ${Object.values(counts).reduce((s, n) => s + n, 0)} rows loaded from ${args[0]}`);
      return 0;
    }
    case 'migrate': {
      const r = await migrate(databaseConfig());
      console.log(r.applied.length ? `applied ${r.applied.join(', ')}` : 'database up to date');
      return 0;
    }
    default:
      console.error('usage: npm run saltus -- backup [file] | restore <file> | migrate');
      return 2;
  }
}

main(process.argv.slice(2))
  .then(async (code) => {
    await closeDb();
    process.exit(code);
  })
  .catch(async (e) => {
    console.error(`saltus: ${e instanceof Error ? e.message : String(e)}`);
    await closeDb();
    process.exit(1);
  });
