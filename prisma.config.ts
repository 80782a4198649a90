import path from 'node:path';
import { defineConfig } from 'prisma/config';

// Prisma CLI configuration for the embedded SQLite default. The PostgreSQL schema lives in
// prisma/postgresql/ (see scripts/db/). The database URL is read from the environment here because
// Prisma 7 does not read .env files by itself.
export default defineConfig({
  schema: path.join('prisma', 'schema.prisma'),
  migrations: { path: path.join('prisma', 'migrations') },
  datasource: { url: process.env.SALTUS_SQLITE_URL ?? 'file:./data/saltus.db' },
});
