#!/usr/bin/env node
// `npm test`: the whole check of a fresh clone, step by step, failing fast.
//   1. type check (tsc --noEmit) and lint (eslint .)
//   2. unit and reference tests (vitest.config.ts)
//   3. integration tests on a fresh SQLite file, then on PostgreSQL
//   4. production build and browser tests (headless chromium through playwright-core)
// The last line printed is `N passed, M failed` (test counts over all vitest runs; a failed step that
// counts no tests, such as the type check or a required step that had to be skipped, adds one to M so
// that line never reads "0 failed" when the run failed); CI reads it.
// Environment: SALTUS_TEST_PG_URL (use this PostgreSQL database instead of starting one),
// SALTUS_REQUIRE_ALL=1 (a skipped step is a failure; CI sets it), SALTUS_CHROMIUM (default /usr/bin/chromium),
// SALTUS_TEST_ONLY=static,unit,integration,e2e (run only these steps; for local use).
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync } from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
process.chdir(root);
const requireAll = process.env.SALTUS_REQUIRE_ALL === '1';
const only = process.env.SALTUS_TEST_ONLY ? new Set(process.env.SALTUS_TEST_ONLY.split(',').map((s) => s.trim())) : null;
const bin = (name) => path.join(root, 'node_modules', '.bin', name);
const scratch = mkdtempSync(path.join(os.tmpdir(), 'saltus-test-'));
const chromiumPath = process.env.SALTUS_CHROMIUM ?? '/usr/bin/chromium';

const totals = { passed: 0, failed: 0 };
const summary = []; // { step, status: 'ok' | 'FAILED' | 'SKIPPED', seconds, note }
const cleanups = [];
let cleanedUp = false;
let current = null; // the running child process

function cleanup() {
  if (cleanedUp) return;
  cleanedUp = true;
  if (current && current.exitCode === null) {
    try {
      process.kill(-current.pid, 'SIGTERM');
    } catch {
      /* already gone */
    }
  }
  for (const fn of cleanups.reverse()) {
    try {
      fn();
    } catch (e) {
      console.error(`cleanup: ${e instanceof Error ? e.message : String(e)}`);
    }
  }
  rmSync(scratch, { recursive: true, force: true });
}

process.on('exit', cleanup);
for (const signal of ['SIGINT', 'SIGTERM', 'SIGHUP']) {
  process.on(signal, () => {
    console.error(`\n${signal}: stopping`);
    cleanup();
    process.exit(130);
  });
}

function heading(text) {
  console.log(`\n==== ${text} ${'='.repeat(Math.max(0, 72 - text.length))}`);
}

function seconds(since) {
  return (Number(process.hrtime.bigint() - since) / 1e9).toFixed(1);
}

/** Runs a command with inherited output in its own process group; resolves with its exit code. */
function run(cmd, args, env = {}) {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { stdio: 'inherit', env: { ...process.env, ...env }, detached: true });
    current = child;
    child.on('error', (e) => {
      console.error(`${cmd}: ${e.message}`);
      resolve(127);
    });
    child.on('exit', (code, signal) => {
      current = null;
      resolve(code ?? (signal ? 128 : 1));
    });
  });
}

function finish() {
  heading('Summary');
  for (const s of summary) {
    console.log(`${s.status.padEnd(8)} ${s.step.padEnd(34)} ${String(s.seconds).padStart(7)} s${s.note ? `  ${s.note}` : ''}`);
  }
  const failedStep = summary.some((s) => s.status === 'FAILED');
  if (failedStep && totals.failed === 0) totals.failed = 1;
  cleanup();
  console.log(`${totals.passed} passed, ${totals.failed} failed`);
  process.exit(failedStep || totals.failed > 0 ? 1 : 0);
}

function fail(step, started, note) {
  summary.push({ step, status: 'FAILED', seconds: seconds(started), note });
  console.error(`\nFAILED: ${step}${note ? ` (${note})` : ''}`);
  finish();
}

function skip(step, message) {
  console.log(message);
  if (requireAll) {
    summary.push({ step, status: 'FAILED', seconds: '0.0', note: `${message} (SALTUS_REQUIRE_ALL=1)` });
    finish();
  }
  summary.push({ step, status: 'SKIPPED', seconds: '0.0', note: message });
}

/** A plain command step. */
async function step(name, cmd, args, env) {
  heading(name);
  const started = process.hrtime.bigint();
  const code = await run(cmd, args, env);
  if (code !== 0) fail(name, started, `exit code ${code}`);
  summary.push({ step: name, status: 'ok', seconds: seconds(started) });
  console.log(`-- ${name}: ok in ${seconds(started)} s`);
}

/** A vitest run; its counts come from the JSON reporter. */
async function vitestStep(name, configFile, env = {}) {
  heading(name);
  const started = process.hrtime.bigint();
  const report = path.join(scratch, `vitest-${summary.length}.json`);
  const args = ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${report}`];
  if (configFile) args.push('--config', configFile);
  const code = await run(bin('vitest'), args, env);
  let counts = null;
  if (existsSync(report)) {
    try {
      const r = JSON.parse(readFileSync(report, 'utf8'));
      counts = { passed: r.numPassedTests ?? 0, failed: r.numFailedTests ?? 0 };
    } catch (e) {
      console.error(`could not read the vitest report: ${e instanceof Error ? e.message : String(e)}`);
    }
  }
  if (!counts) counts = { passed: 0, failed: 0 };
  // A file that fails to load, or an error outside a test, fails the run without a failed test: count it.
  if (code !== 0 && counts.failed === 0) counts.failed = 1;
  totals.passed += counts.passed;
  totals.failed += counts.failed;
  const note = `${counts.passed} passed, ${counts.failed} failed`;
  if (code !== 0) fail(name, started, note);
  summary.push({ step: name, status: 'ok', seconds: seconds(started), note });
  console.log(`-- ${name}: ${note} in ${seconds(started)} s`);
}

function freePort() {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.unref();
    server.on('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address();
      server.close(() => resolve(port));
    });
  });
}

function postgresBinariesFound() {
  const base = '/usr/lib/postgresql';
  if (!existsSync(base)) return false;
  return readdirSync(base).some((v) => existsSync(path.join(base, v, 'bin', 'initdb')) && existsSync(path.join(base, v, 'bin', 'pg_ctl')));
}

/** Starts a throw-away PostgreSQL server; returns its URL and registers its stop. */
async function startPostgres() {
  // Its own folder directly under the temporary directory: as root the server runs as user postgres,
  // who must be able to reach it.
  const dir = mkdtempSync(path.join(os.tmpdir(), 'saltus-pg-'));
  const port = await freePort();
  const script = path.join(root, 'scripts', 'pg-test-server.sh');
  cleanups.push(() => {
    if (existsSync(path.join(dir, 'postmaster.pid'))) spawnSync('bash', [script, 'stop', dir], { stdio: 'inherit' });
    rmSync(dir, { recursive: true, force: true });
  });
  const r = spawnSync('bash', [script, 'start', dir, String(port)], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'inherit'] });
  const url = r.stdout.trim().split('\n').pop() ?? '';
  if (r.status !== 0 || !url.startsWith('postgresql://')) {
    const log = path.join(dir, 'server.log');
    if (existsSync(log)) console.error(readFileSync(log, 'utf8').slice(-3000));
    throw new Error(`scripts/pg-test-server.sh start failed (exit code ${r.status})`);
  }
  return url;
}

/** Newest modification time (ms) of the files under the given paths. */
function newestMtime(paths) {
  let newest = 0;
  const visit = (p) => {
    if (!existsSync(p)) return;
    const st = statSync(p);
    if (st.isDirectory()) {
      for (const entry of readdirSync(p)) visit(path.join(p, entry));
    } else if (st.mtimeMs > newest) newest = st.mtimeMs;
  };
  paths.forEach(visit);
  return newest;
}

function buildIsUpToDate() {
  const buildId = path.join(root, '.next', 'BUILD_ID');
  if (!existsSync(buildId)) return false;
  const inputs = ['src', 'public', 'prisma', 'package.json', 'package-lock.json', 'tsconfig.json', 'postcss.config.mjs', 'postcss.config.js']
    .concat(readdirSync(root).filter((f) => /^next\.config\./.test(f)));
  return statSync(buildId).mtimeMs > newestMtime(inputs.map((p) => path.join(root, p)));
}

function appHasRoutes() {
  const app = path.join(root, 'src', 'app');
  if (!existsSync(app)) return false;
  const found = (dir) =>
    readdirSync(dir, { withFileTypes: true }).some((d) =>
      d.isDirectory() ? found(path.join(dir, d.name)) : /^(page|route)\.(tsx?|jsx?)$/.test(d.name),
    );
  return found(app);
}

const wants = (name) => !only || only.has(name);

// ---------------------------------------------------------------------------------------------------
const allStarted = process.hrtime.bigint();
console.log(`Saltus test run: node ${process.version}, ${os.cpus().length} CPUs${requireAll ? ', SALTUS_REQUIRE_ALL=1' : ''}`);

if (wants('static')) {
  await step('Type check (tsc --noEmit)', bin('tsc'), ['--noEmit', '--incremental', 'false']);
  await step('Lint (eslint .)', bin('eslint'), ['.']);
}

if (wants('unit')) {
  await vitestStep('Unit and reference tests', null);
}

if (wants('integration')) {
  const sqliteFile = path.join(scratch, 'integration.db');
  await vitestStep('Integration tests on SQLite', 'vitest.integration.config.ts', {
    DATABASE_URL: '',
    SALTUS_SQLITE_FILE: sqliteFile,
  });

  const pgStep = 'Integration tests on PostgreSQL';
  let pgUrl = process.env.SALTUS_TEST_PG_URL;
  if (!pgUrl && postgresBinariesFound()) {
    heading('Starting a throw-away PostgreSQL server');
    const started = process.hrtime.bigint();
    try {
      pgUrl = await startPostgres();
      console.log(`PostgreSQL ready in ${seconds(started)} s`);
    } catch (e) {
      fail(pgStep, started, e instanceof Error ? e.message : String(e));
    }
  }
  if (pgUrl) {
    await vitestStep(pgStep, 'vitest.integration.config.ts', { DATABASE_URL: pgUrl, SALTUS_SQLITE_FILE: '' });
  } else {
    skip(pgStep, 'SKIPPED PostgreSQL integration: install the Debian package postgresql');
  }
}

if (wants('e2e')) {
  const e2eStep = 'Browser tests';
  if (!existsSync(chromiumPath)) {
    skip(e2eStep, 'SKIPPED browser tests: install the Debian package chromium');
  } else if (!appHasRoutes()) {
    skip(e2eStep, 'SKIPPED browser tests: src/app has no pages or routes yet');
  } else {
    const env = { NEXT_TELEMETRY_DISABLED: '1' };
    if (buildIsUpToDate()) {
      heading('Production build (next build)');
      console.log('.next is newer than every source file: reusing it');
      summary.push({ step: 'Production build (next build)', status: 'ok', seconds: '0.0', note: 'up to date' });
    } else {
      await step('Production build (next build)', bin('next'), ['build'], env);
    }
    await vitestStep(e2eStep, 'vitest.e2e.config.ts', env);
  }
}

console.log(`\nall steps done in ${seconds(allStarted)} s`);
finish();
