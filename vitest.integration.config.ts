import { defineConfig } from 'vitest/config';
import { rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

// Run by hand without a database named, the suite uses a throw-away SQLite file, never data/saltus.db.
const defaultEnv: Record<string, string> = {};
if (!process.env.DATABASE_URL && !process.env.SALTUS_SQLITE_FILE) {
  const file = path.join(os.tmpdir(), `saltus-integration-${process.pid}.db`);
  defaultEnv.SALTUS_SQLITE_FILE = file;
  process.once('exit', () => {
    for (const suffix of ['', '-wal', '-shm', '-journal']) rmSync(file + suffix, { force: true });
  });
}

// Integration tests against a real database: the SQLite file named by SALTUS_SQLITE_FILE, or the
// PostgreSQL database of DATABASE_URL (scripts/test-all.mjs runs this suite once on each). The files
// share that one database, so they run one after another; each resets it in its beforeAll.
export default defineConfig({
  resolve: { alias: { '@': fileURLToPath(new URL('./src', import.meta.url)) } },
  test: {
    include: ['test/integration/**/*.test.ts'],
    environment: 'node',
    pool: 'forks',
    fileParallelism: false,
    testTimeout: 60_000,
    hookTimeout: 60_000,
    env: defaultEnv,
  },
});
