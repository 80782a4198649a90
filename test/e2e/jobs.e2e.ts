/**
 * Long computations as jobs, in the browser at a tablet viewport on the built app (demo campaign):
 * 1 an optimal-design search large enough to take several seconds shows a progress bar whose message
 * moves, is cancelled with the Cancel button and ends "cancelled" with its best design so far kept;
 * 2 a small search runs to completion, its id stays in the URL, and coming back to that URL shows the
 * result again; 3 the stateless POST /api/v1/designs (optimal) still answers its design directly.
 * Screenshots: test-results/jobs-*.png.
 */
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, startApp, tabletPage, type RunningApp } from './harness';

describe('design searches as jobs on a tablet', () => {
  let app: RunningApp;
  let browser: Browser;
  let page: Page;
  let id = '';
  const errors: string[] = [];

  beforeAll(async () => {
    app = await startApp({ seed: true });
    browser = await launchBrowser();
    page = await tabletPage(browser);
    page.on('pageerror', (e) => errors.push(e.message));
    const list = (await (await app.fetch(`${app.baseUrl}/api/v1/campaigns`)).json()) as { campaigns: { id: string }[] };
    id = list.campaigns[0]!.id;
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  const job = () => page.getByTestId('job');

  it('1 · shows the progress of a long search, cancels it and keeps the best design so far', async () => {
    await page.goto(`${app.baseUrl}/campaigns/${id}/planner`);
    expect(await page.getByLabel('Candidate B method').inputValue()).toBe('optimal');
    await page.getByLabel('Candidate B random starts').fill('10000');
    await page.getByRole('button', { name: 'Compare candidates' }).click();
    await job().waitFor({ timeout: 30_000 });
    await page.waitForURL(/\?jobs=,[A-Za-z0-9_-]+$/);
    const message = page.getByTestId('job-message');
    await expect.poll(() => message.innerText(), { timeout: 60_000 }).toMatch(/start \d+ of 10000, best D-efficiency \d\.\d\d/);
    const first = await message.innerText();
    await expect.poll(() => message.innerText(), { timeout: 30_000 }).not.toBe(first);
    const bar = page.getByRole('progressbar', { name: 'Candidate B search progress' });
    expect(Number(await bar.getAttribute('aria-valuenow'))).toBeLessThan(100);
    await screenshot(page, 'jobs-1-running');

    const cancel = page.getByRole('button', { name: 'Cancel candidate b search' });
    const box = await cancel.boundingBox();
    expect(box!.height).toBeGreaterThanOrEqual(44);
    await cancel.click();
    await expect.poll(() => job().getAttribute('data-status'), { timeout: 30_000 }).toBe('cancelled');
    expect(await page.getByTestId('job-status').innerText()).toContain('cancelled');
    // The best design found before the cancel is shown beside candidate A.
    const table = page.getByTestId('comparison-table');
    await expect.poll(() => table.locator('thead th').count(), { timeout: 30_000 }).toBe(3);
    expect(await table.innerText()).toMatch(/random starts \(cancelled: best design so far\)/);
    await screenshot(page, 'jobs-1-cancelled');
  });

  it('2 · runs a search to completion; the URL brings it back', async () => {
    await page.getByLabel('Candidate B random starts').fill('30');
    await page.getByRole('button', { name: 'Compare candidates' }).click();
    await expect.poll(() => job().getAttribute('data-status'), { timeout: 90_000 }).toBe('done');
    const table = page.getByTestId('comparison-table');
    await expect.poll(() => table.locator('thead th').count(), { timeout: 30_000 }).toBe(3);
    expect(await table.innerText()).toMatch(/30 random starts/);
    const url = page.url();
    expect(url).toMatch(/\?jobs=,[A-Za-z0-9_-]+$/);

    await page.goto(`${app.baseUrl}/campaigns/${id}`);
    await page.goto(url);
    await expect.poll(() => job().getAttribute('data-status'), { timeout: 30_000 }).toBe('done');
    await expect.poll(() => page.getByTestId('comparison-table').innerText(), { timeout: 30_000 }).toMatch(/30 random starts/);
    await screenshot(page, 'jobs-2-done');
    expect(errors).toEqual([]);
  });

  it('3 · the stateless design route still answers an optimal design directly', async () => {
    const res = await app.fetch(`${app.baseUrl}/api/v1/designs`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({
        factors: [
          { name: 'preload', kind: 'continuous', low: 1, high: 5 },
          { name: 'payload', kind: 'continuous', low: 0, high: 2 },
        ],
        method: 'optimal',
        model: 'quadratic',
        runs: 9,
        seed: 1,
      }),
    });
    expect(res.status).toBe(200);
    const body = (await res.json()) as { runs: unknown[]; diagnostics: { optimal: { startsCompleted: number } } };
    expect(body.runs).toHaveLength(9);
    expect(body.diagnostics.optimal.startsCompleted).toBe(20);
  });
});
