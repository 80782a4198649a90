/**
 * The rig page without network, in the browser at a tablet viewport on the built app: the page is
 * opened once online (its service worker keeps the shell), the network goes away, the page still
 * opens, three trials are logged into the tablet's outbox, the network comes back and exactly three
 * trials are stored; sending the outbox again stores nothing new; a newer deploy is announced with
 * the outbox kept. Screenshots: test-results/rig-offline-*.png.
 */
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, startApp, tabletPage, type RunningApp } from './harness';

describe('the rig page offline', () => {
  let app: RunningApp;
  let browser: Browser;
  let page: Page;
  let context: BrowserContext;
  let campaignId = '';
  let rigUrl = '';
  const errors: string[] = [];

  async function api<T>(path: string, body?: unknown): Promise<T> {
    const res = await app.fetch(`${app.baseUrl}${path}`, {
      method: body === undefined ? 'GET' : 'POST',
      headers: { 'content-type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    if (!res.ok) throw new Error(`${path}: ${res.status} ${await res.text()}`);
    return (await res.json()) as T;
  }

  async function storedTrials(): Promise<{ id: string; status: string; idempotencyKey: string | null }[]> {
    return (await api<{ trials: { id: string; status: string; idempotencyKey: string | null }[] }>(`/api/v1/campaigns/${campaignId}/trials`)).trials;
  }

  beforeAll(async () => {
    app = await startApp({ seed: false });
    browser = await launchBrowser();
    page = await tabletPage(browser);
    context = page.context();
    page.on('pageerror', (e) => errors.push(e.message));
    const campaign = await api<{ id: string; rigs: { id: string }[] }>('/api/v1/campaigns', {
      name: 'Offline bench check',
      factors: [
        { name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 1.8 },
        { name: 'gain', kind: 'continuous', low: 0.5, high: 2 },
      ],
      responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
      robots: [{ name: 'Test hopper 2', massGrams: 0.95, heightMm: 45 }],
      rigs: [{ name: 'Bench B', timeZone: 'UTC', workdays: [1, 2, 3, 4, 5, 6, 7], startTime: '00:00', endTime: '23:59' }],
    });
    campaignId = campaign.id;
    await api(`/api/v1/campaigns/${campaignId}/designs`, { method: 'full-factorial', seed: 3 });
    await api(`/api/v1/campaigns/${campaignId}/schedule`, { startDate: new Date().toISOString().slice(0, 10), days: 3 });
    rigUrl = `${app.baseUrl}/campaigns/${campaignId}/rigs/${campaign.rigs[0]!.id}`;
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('1 · opens online, keeps its shell, and opens again without network', async () => {
    await page.goto(rigUrl);
    await page.getByRole('heading', { name: /Rig log: Bench B/ }).waitFor();
    // The service worker controls the page and has kept the page and its static files.
    await expect
      .poll(
        () =>
          page.evaluate(async () => {
            if (!navigator.serviceWorker.controller) return false;
            // One shell cache, named by the build the page came from.
            const names = (await caches.keys()).filter((n) => n.startsWith('saltus-rig-shell-'));
            if (names.length !== 1 || names[0] === 'saltus-rig-shell-dev') return false;
            const cache = await caches.open(names[0]!);
            const keys = await cache.keys();
            return keys.some((k) => new URL(k.url).pathname === location.pathname) && keys.some((k) => k.url.includes('/_next/static/'));
          }),
        { timeout: 20_000 },
      )
      .toBe(true);
    await context.setOffline(true);
    await page.reload();
    await page.getByRole('heading', { name: /Rig log: Bench B/ }).waitFor();
    await page.getByRole('button', { name: /^Start run \d+/ }).first().waitFor();
    // The server is out of reach (navigator.onLine is not asserted: after a reload under emulated
    // offline, Chromium reports true for the new document).
    expect(await page.evaluate(() => fetch('/api/v1/version', { cache: 'no-store' }).then(() => 'reached', () => 'unreachable'))).toBe('unreachable');
  });

  it('2 · logs three trials offline; they wait on the tablet and nothing reaches the server', async () => {
    const apex = [182, 231, 160];
    const queued = await page.getByTestId('rig-queue').locator('li').count();
    expect(queued).toBeGreaterThanOrEqual(4);
    for (const value of apex) {
      await page.getByRole('button', { name: /^Start run \d+/ }).first().click();
      const finish = page.getByRole('button', { name: 'Finish trial' });
      expect((await finish.boundingBox())!.height).toBeGreaterThanOrEqual(44);
      if (value === apex[0]) {
        // The standard readings are offered although the campaign declares only the apex, with large targets.
        const labels = await page.getByTestId('standard-readings').locator('label').allInnerTexts();
        expect(labels.map((l) => l.replace(/\s+/g, ' ').trim())).toEqual([
          'Apex height (mm) · apex_height',
          'Hops completed · hops_completed',
          'Distance travelled (mm) · distance_travelled',
          'Electrical energy drawn (mJ) · energy_drawn',
        ]);
        for (const input of await page.getByTestId('standard-readings').locator('input').all()) expect((await input.boundingBox())!.height).toBeGreaterThanOrEqual(44);
        await page.getByLabel('Outcome').selectOption('failed');
        expect(await page.getByLabel('Failure reason').locator('option').allInnerTexts()).toEqual(['(choose)', 'fell', 'broke', 'stalled', 'other']);
        await page.getByLabel('Outcome').selectOption('passed');
      }
      await page.getByLabel(/apex_height/).fill(String(value));
      await finish.click();
      await finish.waitFor({ state: 'detached' });
      await expect.poll(() => page.getByRole('status').first().innerText()).toMatch(/waiting to send/);
    }
    await expect.poll(() => page.getByTestId('outbox-count').innerText()).toMatch(/^3 entries waiting to send/);
    expect(await page.getByTestId('outbox').locator('li[data-state="waiting"]').count()).toBe(3);
    // The logged runs left the queue, so the operator moves on.
    expect(await page.getByTestId('rig-queue').locator('li').count()).toBe(queued - 3);
    expect(await storedTrials()).toHaveLength(0);
    await screenshot(page, 'rig-offline-1-waiting');
  });

  it('3 · sends the outbox on reconnect and the server holds exactly three trials', async () => {
    await context.setOffline(false);
    await expect.poll(async () => (await storedTrials()).length, { timeout: 30_000 }).toBe(3);
    await expect.poll(() => page.getByTestId('outbox').locator('li[data-state="sent"]').count(), { timeout: 15_000 }).toBe(3);
    expect(await page.getByTestId('outbox-count').innerText()).toMatch(/Nothing waiting/);
    const trials = await storedTrials();
    expect(trials.every((t) => t.status === 'done')).toBe(true);
    expect(new Set(trials.map((t) => t.idempotencyKey)).size).toBe(3);
    await screenshot(page, 'rig-offline-2-sent');
  });

  it('4 · sending the same entries again stores nothing new', async () => {
    const answers = await page.evaluate(async (id) => {
      const db = await new Promise<IDBDatabase>((resolve, reject) => {
        const req = indexedDB.open('saltus-rig');
        req.onsuccess = () => resolve(req.result);
        req.onerror = () => reject(req.error);
      });
      const entries = await new Promise<{ key: string; body: unknown }[]>((resolve, reject) => {
        const req = db.transaction('entries').objectStore('entries').getAll();
        req.onsuccess = () => resolve(req.result as { key: string; body: unknown }[]);
        req.onerror = () => reject(req.error);
      });
      db.close();
      const out: { status: number; replayed: boolean }[] = [];
      for (const e of entries) {
        const res = await fetch(`/api/v1/campaigns/${id}/trials/log`, {
          method: 'POST',
          // signed in by cookie: a change carries the session's CSRF value, as the app's own calls do
          headers: { 'content-type': 'application/json', 'Idempotency-Key': e.key, 'x-csrf-token': /saltus_csrf=([^;]*)/.exec(document.cookie)?.[1] ?? '' },
          body: JSON.stringify(e.body),
        });
        out.push({ status: res.status, replayed: ((await res.json()) as { replayed: boolean }).replayed });
      }
      return out;
    }, campaignId);
    expect(answers).toHaveLength(3);
    expect(answers.every((a) => a.status === 200 && a.replayed)).toBe(true);
    expect(await storedTrials()).toHaveLength(3);
  });

  it('5 · a run logged on two tablets is shown to the second as a conflict with both values, never overwritten', async () => {
    const second = await tabletPage(browser);
    second.on('pageerror', (e) => errors.push(e.message));
    await second.goto(rigUrl);
    const startOn = (p: Page) => p.getByRole('button', { name: /^Start run \d+/ }).first();
    await startOn(second).waitFor();
    const runLabel = await startOn(second).getAttribute('aria-label');
    expect(await startOn(page).getAttribute('aria-label')).toBe(runLabel);

    // The second tablet loses the network and logs the run; the first logs the same run online.
    await second.context().setOffline(true);
    await startOn(second).click();
    await second.getByLabel(/apex_height/).fill('150');
    await second.getByRole('button', { name: 'Finish trial' }).click();
    await expect.poll(() => second.getByTestId('outbox-count').innerText()).toMatch(/^1 entry waiting to send/);
    await startOn(page).click();
    await page.getByLabel(/apex_height/).fill('170');
    await page.getByRole('button', { name: 'Finish trial' }).click();
    await expect.poll(() => page.getByRole('status').first().innerText()).toMatch(/logged\./);
    expect(await storedTrials()).toHaveLength(4);

    await second.context().setOffline(false);
    const conflict = second.getByTestId('conflict');
    await expect.poll(() => conflict.count(), { timeout: 30_000 }).toBe(1);
    const text = await conflict.innerText();
    expect(text).toMatch(/apex_height 170/);
    expect(text).toMatch(/apex_height 150/);
    expect(await storedTrials()).toHaveLength(4);
    await screenshot(second, 'rig-offline-3-conflict');

    // The operator keeps both: stored as a repeat trial, the first tablet's value untouched.
    await second.getByRole('button', { name: 'Store mine as a repeat trial' }).click();
    await expect.poll(() => second.getByTestId('outbox').locator('li[data-state="sent"]').count(), { timeout: 15_000 }).toBe(1);
    const trials = (await api<{ trials: { observations: { name: string; value: number }[] }[] }>(`/api/v1/campaigns/${campaignId}/trials`)).trials;
    expect(trials).toHaveLength(5);
    const apexValues = trials.map((t) => t.observations.find((o) => o.name === 'apex_height')?.value).sort();
    expect(apexValues).toEqual([150, 160, 170, 182, 231]);
    await second.context().close();
    expect(errors).toEqual([]);
  });

  it('6 · tells the operator when a newer version is deployed, keeping the entries on the tablet', async () => {
    const entriesBefore = await page.getByTestId('outbox').locator('li').count();
    await page.route('**/api/v1/version', (route) => route.fulfill({ json: { buildId: 'a-newer-build' } }));
    await page.evaluate(() => window.dispatchEvent(new Event('online')));
    const banner = page.getByTestId('newer-version');
    await expect.poll(() => banner.count(), { timeout: 15_000 }).toBe(1);
    expect(await banner.innerText()).toMatch(/newer version .* ready/i);
    expect((await banner.getByRole('button', { name: 'Reload now' }).boundingBox())!.height).toBeGreaterThanOrEqual(44);
    expect(await page.getByTestId('outbox').locator('li').count()).toBe(entriesBefore);
    await page.unroute('**/api/v1/version');
    expect(errors).toEqual([]);
  });
});
