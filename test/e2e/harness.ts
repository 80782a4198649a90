/**
 * Browser-test harness: the production build (`next build` must have run; `npm test` does it) served by
 * `next start` on a free loopback port with a throw-away SQLite database (migrated, plus the demo seed
 * when scripts/seed.ts exists), and headless chromium through playwright-core.
 *
 *   const app = await startApp();           // { baseUrl, databaseUrl, stop(), output() }
 *   const browser = await launchBrowser();
 *   const page = await tabletPage(browser); // iPad (gen 7) viewport, touch
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
}

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
  const removeDir = () => rmSync(dir, { recursive: true, force: true });

  try {
    await migrate(databaseConfig(env), repoRoot);
    const seedScript = path.join(repoRoot, 'scripts', 'seed.ts');
    if (options.seed !== false && existsSync(seedScript)) {
      const tsx = path.join(repoRoot, 'node_modules', 'tsx', 'dist', 'cli.mjs');
      const seeded = spawnSync(process.execPath, [tsx, seedScript], { cwd: repoRoot, env, encoding: 'utf8', timeout: 120_000 });
      if (seeded.status !== 0) {
        throw new Error(`scripts/seed.ts failed (exit code ${seeded.status}):\n${seeded.stdout}\n${seeded.stderr}`);
      }
    }
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
        return { baseUrl, databaseUrl: `file:${dbFile}`, output: () => log, stop, crash };
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

/** A fresh context emulating a tablet at the rig (810 x 1080 CSS pixels, touch) and a page in it. */
export async function tabletPage(browser: Browser, extra: Parameters<Browser['newContext']>[0] = {}): Promise<Page> {
  const context: BrowserContext = await browser.newContext({ ...tabletDevice, ...extra });
  return context.newPage();
}

/** Saves a full-page screenshot as test-results/<name>.png and returns its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(resultsDir, { recursive: true });
  const file = path.join(resultsDir, `${name.replace(/[^\w.-]+/g, '-')}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
