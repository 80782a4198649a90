// `npm start`: prepare and serve Saltus. Generates the Prisma clients if missing, applies pending
// migrations (SQLite in data/saltus.db by default, PostgreSQL when DATABASE_URL says so), seeds the
// demo campaign into an empty database, builds the app when no build exists, then serves it.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';

const root = process.cwd();
const env = { ...process.env, NEXT_TELEMETRY_DISABLED: '1' };
const port = process.env.PORT ?? '3000';
const tsx = path.join(root, 'node_modules', 'tsx', 'dist', 'cli.mjs');
const nextBin = path.join(root, 'node_modules', 'next', 'dist', 'bin', 'next');

function step(label, args) {
  const t0 = Date.now();
  const r = spawnSync(process.execPath, args, { stdio: 'inherit', env });
  if (r.status !== 0) {
    console.error(`saltus: ${label} failed; see the message above`);
    process.exit(r.status ?? 1);
  }
  console.log(`saltus: ${label} (${((Date.now() - t0) / 1000).toFixed(1)} s)`);
}

if (!existsSync(path.join(root, 'src', 'generated', 'sqlite', 'client.ts'))) step('generated database clients', [path.join('scripts', 'db', 'generate.mjs')]);
step('database migrated', [tsx, path.join('scripts', 'migrate.ts')]);
step('demo campaign and accounts checked', [tsx, path.join('scripts', 'seed.ts'), ...(process.env.SALTUS_NO_DEMO === '1' ? ['--no-demo'] : [])]);
if (!existsSync(path.join(root, '.next', 'BUILD_ID')) || process.env.SALTUS_REBUILD === '1') step('app built', [nextBin, 'build']);

console.log(`saltus: serving on http://localhost:${port}`);
const server = spawn(process.execPath, [nextBin, 'start', '-p', port, ...(process.env.HOSTNAME ? ['-H', process.env.HOSTNAME] : [])], { stdio: 'inherit', env });
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => server.kill(sig));
server.on('exit', (code) => process.exit(code ?? 0));
