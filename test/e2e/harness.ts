/**
 * Browser-test harness: the production build (`next build` must have run; `npm test` does it) served by
 * `next start` on a free loopback port with a throw-away SQLite database (migrated, plus the demo seed
 * when scripts/seed.ts exists), and headless chromium through playwright-core.
 *
 *   const app = await startApp();           // { baseUrl, databaseUrl, admin, fetch(), addUser(), stop(), output() }
 *   const browser = await launchBrowser();
 *   const page = await tabletPage(browser); // iPad (gen 7) viewport, touch, signed in as the app's admin
 *   const res = await app.fetch(`${app.baseUrl}/api/v1/campaigns`); // with the admin's API token
 *
 * Every app gets an admin account and an admin API token (made through the repository, as the CLI
 * makes them; `app.addUser(role)` runs `npm run saltus -- user add`); pages need a signed-in person, so
 * tabletPage signs in through /login.
 *   await page.goto(`${app.baseUrl}/`);
 *   await screenshot(page, 'home');         // test-results/home.png
 *   await browser.close(); await app.stop();
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, devices, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { createToken, createUser } from '@/server/auth/accounts';
import { closeDb } from '@/server/db/client';
import { databaseConfig } from '@/server/db/config';
import { migrate } from '@/server/db/migrate';

export const repoRoot = fileURLToPath(new URL('../..', import.meta.url));
export const resultsDir = path.join(repoRoot, 'test-results');
export const chromiumPath = process.env.SALTUS_CHROMIUM ?? '/usr/bin/chromium';
export const tabletDevice = devices['iPad (gen 7)'];

export interface RunningApp {
  /** e.g. http://127.0.0.1:41234 (no trailing slash) */
  baseUrl: string;
  /** the app's DATABASE_URL (file:...), for tests that look into the database */
  databaseUrl: string;
  /** the server's output so far (stdout and stderr) */
  output(): string;
  /** stops the server and removes its database (unless it was given in `databaseFile`); safe to call twice */
  stop(): Promise<void>;
  /** kill -9 of the server's whole process group, no shutdown at all (a crash); keeps the database */
  crash(): Promise<void>;
  /** the admin account made for the test */
  admin: Account;
  /** an admin API token (Authorization: Bearer …) */
  token: string;
  /** fetch with the admin token's Authorization header added */
  fetch(url: string, init?: RequestInit): Promise<Response>;
  /** a further account with the role, made with the CLI */
  addUser(role: 'admin' | 'planner' | 'operator' | 'viewer'): Account;
}

export interface Account {
  email: string;
  password: string;
}

let lastApp: RunningApp | null = null;

export interface StartOptions {
  /** run scripts/seed.ts when it exists (default true) */
  seed?: boolean;
  /** extra environment for the server */
  env?: Record<string, string>;
  /** how long to wait for /api/health (default 60 s) */
  readyTimeoutMs?: number;
  /**
   * serve this SQLite file (migrated if needed; kept on stop), e.g. to restart on the database a
   * crashed server left behind; default a fresh throw-away file
   */
  databaseFile?: string;
}

const running = new Set<ChildProcess>();
// Never leave a server behind, whatever ends this process.
process.once('exit', () => {
  for (const child of running) killGroup(child, 'SIGKILL');
});

function killGroup(child: ChildProcess, signal: NodeJS.Signals): void {
  if (child.pid === undefined || child.exitCode !== null || child.signalCode !== null) return;
  try {
    process.kill(-child.pid, signal);
  } catch {
    try {
      child.kill(signal);
    } catch {
      /* already gone */
    }
  }
}

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.unref();
    server.on('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * The test's admin account and admin API token, made through the repository (as the CLI makes them) in
 * the app's database: this process points its database client there for the moment.
 */
async function makeAdmin(env: NodeJS.ProcessEnv): Promise<{ admin: Account; token: string }> {
  const saved = { DATABASE_URL: process.env.DATABASE_URL, SALTUS_SQLITE_FILE: process.env.SALTUS_SQLITE_FILE };
  const tag = Date.now().toString(36) + Math.random().toString(36).slice(2, 6);
  const admin = { email: `admin-${tag}@e2e.example`, password: `e2e-password-${tag}-long-enough` };
  await closeDb();
  process.env.DATABASE_URL = env.DATABASE_URL;
  process.env.SALTUS_SQLITE_FILE = env.SALTUS_SQLITE_FILE;
  try {
    await createUser({ email: admin.email, name: 'E2E admin', role: 'admin', password: admin.password }, 'e2e-setup');
    const { token } = await createToken({ name: `e2e-admin-${tag}`, role: 'admin' }, 'e2e-setup');
    return { admin, token };
  } finally {
    await closeDb();
    for (const [k, v] of Object.entries(saved)) {
      if (v === undefined) delete process.env[k];
      else process.env[k] = v;
    }
  }
}

/** Starts the built app on a fresh database and waits until GET /api/health answers {"status":"ok"}. */
export async function startApp(options: StartOptions = {}): Promise<RunningApp> {
  if (!existsSync(path.join(repoRoot, '.next', 'BUILD_ID'))) {
    throw new Error('no production build in .next: run `npx next build` first (npm test does)');
  }
  const dir = mkdtempSync(path.join(os.tmpdir(), 'saltus-e2e-'));
  const dbFile = options.databaseFile ?? path.join(dir, 'e2e.db');
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    DATABASE_URL: `file:${dbFile}`,
    SALTUS_SQLITE_FILE: dbFile,
    NEXT_TELEMETRY_DISABLED: '1',
    NODE_ENV: 'production',
    ...options.env,
  };
  env.SALTUS_DEMO_LOGIN_FILE ??= path.join(dir, 'demo-login.txt');
  // the browser tests run many analyses and proposals in a short time as one person
  env.SALTUS_HEAVY_BURST ??= '1000';
  const removeDir = () => rmSync(dir, { recursive: true, force: true });
  const tsx = path.join(repoRoot, 'node_modules', 'tsx', 'dist', 'cli.mjs');
  const cli = (args: string[], input?: string) => {
    const r = spawnSync(process.execPath, [tsx, path.join(repoRoot, 'scripts', 'saltus.ts'), ...args], { cwd: repoRoot, env, encoding: 'utf8', input, timeout: 120_000 });
    if (r.status !== 0) throw new Error(`npm run saltus -- ${args.join(' ')} failed (exit code ${r.status}):\n${r.stdout}\n${r.stderr}`);
    return r.stdout;
  };
  let users = 0;
  const addUser = (role: 'admin' | 'planner' | 'operator' | 'viewer'): Account => {
    users += 1;
    // unique per start: a restart on the same database file (crash test) adds its own
    const tag = `${Date.now().toString(36)}${users}`;
    const account = { email: `${role}-${tag}@e2e.example`, password: `e2e-password-${tag}-long-enough` };
    cli(['user', 'add', '--email', account.email, '--name', `E2E ${role} ${users}`, '--role', role, '--password-stdin'], account.password);
    return account;
  };
  let admin: Account;
  let token = '';

  try {
    await migrate(databaseConfig(env), repoRoot);
    const seedScript = path.join(repoRoot, 'scripts', 'seed.ts');
    if (options.seed !== false && existsSync(seedScript)) {
      const seeded = spawnSync(process.execPath, [tsx, seedScript], { cwd: repoRoot, env, encoding: 'utf8', timeout: 120_000 });
      if (seeded.status !== 0) {
        throw new Error(`scripts/seed.ts failed (exit code ${seeded.status}):\n${seeded.stdout}\n${seeded.stderr}`);
      }
    }
    ({ admin, token } = await makeAdmin(env));
  } catch (e) {
    removeDir();
    throw e;
  }

  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  const next = path.join(repoRoot, 'node_modules', 'next', 'dist', 'bin', 'next');
  const child = spawn(process.execPath, [next, 'start', '--port', String(port), '--hostname', '127.0.0.1'], {
    cwd: repoRoot,
    env,
    detached: true, // its own process group, so stop() reaches any worker it starts
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  running.add(child);
  let log = '';
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));

  let stopped = false;
  const crash = async () => {
    if (stopped) return;
    stopped = true;
    killGroup(child, 'SIGKILL');
    await Promise.race([exited, sleep(5000)]);
    running.delete(child);
    removeDir();
  };
  const stop = async () => {
    if (stopped) return;
    stopped = true;
    killGroup(child, 'SIGTERM');
    const done = await Promise.race([exited.then(() => true), sleep(5000).then(() => false)]);
    if (!done) {
      killGroup(child, 'SIGKILL');
      await Promise.race([exited, sleep(2000)]);
    }
    running.delete(child);
    removeDir();
  };

  const deadline = Date.now() + (options.readyTimeoutMs ?? 60_000);
  let last = '';
  while (Date.now() < deadline) {
    if (child.exitCode !== null || child.signalCode !== null) {
      await stop();
      throw new Error(`next start exited (code ${child.exitCode ?? child.signalCode}) before it was ready:\n${log}`);
    }
    try {
      const res = await fetch(`${baseUrl}/api/health`, { signal: AbortSignal.timeout(5000) });
      const body = await res.text();
      if (res.ok && (JSON.parse(body) as { status?: string }).status === 'ok') {
        const authFetch = (url: string, init: RequestInit = {}) => {
          const headers = new Headers(init.headers);
          headers.set('authorization', `Bearer ${token}`);
          return fetch(url, { ...init, headers });
        };
        lastApp = { baseUrl, databaseUrl: `file:${dbFile}`, output: () => log, stop, crash, admin: admin!, token, fetch: authFetch, addUser };
        return lastApp;
      }
      last = `HTTP ${res.status}: ${body.slice(0, 300)}`;
    } catch (e) {
      last = e instanceof Error ? e.message : String(e);
    }
    await sleep(250);
  }
  await stop();
  throw new Error(`the app did not answer GET /api/health with {"status":"ok"} in time (last: ${last}):\n${log}`);
}

/** Headless Debian chromium with the flags that work in containers and without network. */
export async function launchBrowser(): Promise<Browser> {
  if (!existsSync(chromiumPath)) throw new Error(`no chromium at ${chromiumPath}: install the Debian package chromium`);
  return chromium.launch({
    executablePath: chromiumPath,
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

/**
 * A fresh context emulating a tablet at the rig (810 x 1080 CSS pixels, touch) and a page in it,
 * signed in through /login as `account` (default: the admin of the app started last; null: not signed in).
 */
export async function tabletPage(browser: Browser, extra: Parameters<Browser['newContext']>[0] = {}, account: Account | null | undefined = undefined): Promise<Page> {
  const context: BrowserContext = await browser.newContext({ ...tabletDevice, ...extra });
  const page = await context.newPage();
  const who = account === undefined ? lastApp?.admin : account;
  if (who && lastApp) await signIn(page, lastApp.baseUrl, who);
  return page;
}

/** Signs in through the /login page and waits until it has left it. */
export async function signIn(page: Page, baseUrl: string, account: Account): Promise<void> {
  await page.goto(`${baseUrl}/login`);
  await page.getByLabel('E-mail').fill(account.email);
  await page.getByLabel('Password').fill(account.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/login'), { timeout: 30_000 });
}

/** Saves a full-page screenshot as test-results/<name>.png and returns its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(resultsDir, { recursive: true });
  const file = path.join(resultsDir, `${name.replace(/[^\w.-]+/g, '-')}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
