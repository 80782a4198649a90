/** `npm run db:migrate`: apply pending migrations to the configured database. */
import { migrate } from '../src/server/db/migrate';
import { databaseConfig } from '../src/server/db/config';

const config = databaseConfig();
migrate(config)
  .then((r) => {
    const where = config.provider === 'sqlite' ? config.filePath : 'PostgreSQL';
    console.log(r.applied.length ? `applied ${r.applied.join(', ')} to ${where}` : `database up to date (${r.alreadyApplied} migrations)`);
  })
  .catch((e) => {
    console.error(`migration failed: ${e instanceof Error ? e.message : String(e)}`);
    process.exit(1);
  });
