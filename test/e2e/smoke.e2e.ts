/**
 * Smoke test of the production build: the server answers its health check and the home page renders
 * on a tablet without script errors or sideways scrolling. Screenshot: test-results/smoke-home-tablet.png.
 */
import { existsSync } from 'node:fs';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, startApp, tabletPage, type RunningApp } from './harness';

describe('smoke: the built app on a tablet', () => {
  let app: RunningApp | undefined;
  let browser: Browser | undefined;

  beforeAll(async () => {
    app = await startApp();
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('answers GET /api/health with {"status":"ok"}', async () => {
    const res = await fetch(`${app!.baseUrl}/api/health`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/application\/json/);
    expect(await res.json()).toMatchObject({ status: 'ok' });
  });

  it('loads the helper thread that shares large least-squares fits (analysisThreads 2)', async () => {
    // The production server starts it at boot (instrumentation); it loads in about a second.
    let threads = 0;
    for (let i = 0; i < 60 && threads !== 2; i++) {
      threads = ((await (await fetch(`${app!.baseUrl}/api/health`)).json()) as { analysisThreads: number }).analysisThreads;
      if (threads !== 2) await new Promise((r) => setTimeout(r, 500));
    }
    expect(threads).toBe(2);
  });

  it('renders the home page at a tablet viewport', async () => {
    const page = await tabletPage(browser!);
    const scriptErrors: string[] = [];
    const failedRequests: string[] = [];
    page.on('pageerror', (e) => scriptErrors.push(e.message));
    page.on('response', (r) => {
      // The browser asks for /favicon.ico on its own; the page does not link it.
      if (r.status() >= 400 && new URL(r.url()).pathname !== '/favicon.ico') failedRequests.push(`${r.status()} ${r.url()}`);
    });

    const res = await page.goto(`${app!.baseUrl}/`, { waitUntil: 'networkidle' });
    expect(res?.status()).toBe(200);
    expect(page.viewportSize()).toEqual({ width: 810, height: 1080 });
    expect((await page.title()).trim()).not.toBe('');
    expect((await page.locator('body').innerText()).trim().length).toBeGreaterThan(0);
    const widths = await page.evaluate(() => ({ content: document.documentElement.scrollWidth, viewport: window.innerWidth }));
    expect(widths.content, 'the page scrolls sideways on a tablet').toBeLessThanOrEqual(widths.viewport);

    const file = await screenshot(page, 'smoke-home-tablet');
    expect(existsSync(file)).toBe(true);
    expect(scriptErrors, 'script errors on the page').toEqual([]);
    expect(failedRequests, 'requests of the page that failed').toEqual([]);
    await page.context().close();
  });
});
