// Generates both Prisma clients (SQLite and PostgreSQL) after install. `prisma generate` needs no
// schema engine, but the CLI wants the engine path to exist: a stand-in is given when the native
// engine could not be downloaded.
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';

const root = process.cwd();
const env = { ...process.env, PRISMA_HIDE_UPDATE_MESSAGE: '1', CHECKPOINT_DISABLE: '1' };
if (!env.PRISMA_SCHEMA_ENGINE_BINARY) env.PRISMA_SCHEMA_ENGINE_BINARY = process.execPath;
execFileSync(process.execPath, [path.join('node_modules', 'tsx', 'dist', 'cli.mjs'), path.join('scripts', 'db', 'generate-pg-schema.ts')], { stdio: 'inherit', env });
const prisma = path.join(root, 'node_modules', 'prisma', 'build', 'index.js');
if (!existsSync(prisma)) {
  console.error('prisma is not installed; run npm install first');
  process.exit(1);
}
for (const schema of [path.join('prisma', 'schema.prisma'), path.join('prisma', 'postgresql', 'schema.prisma')]) {
  execFileSync(process.execPath, [prisma, 'generate', '--schema', schema], { stdio: ['ignore', 'ignore', 'inherit'], env });
}
console.log('generated Prisma clients for SQLite and PostgreSQL');
