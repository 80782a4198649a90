/**
 * Findings of a split-plot campaign in the browser: a design with whole plots (surface is hard to
 * change), trials logged on two rigs through the API, then the findings page fits the split plot by
 * itself and says which error each term is tested against, with the variance components and the
 * residual plots by run order, whole plot and rig; the printable report shows the same. Invented
 * scenario. Screenshots: test-results/split-plot-*.png.
 */
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, startApp, tabletPage, type RunningApp } from './harness';

describe('split-plot findings on a tablet', () => {
  let app: RunningApp;
  let browser: Browser;
  let page: Page;
  let id = '';
  const errors: string[] = [];

  beforeAll(async () => {
    app = await startApp({ seed: false });
    browser = await launchBrowser();
    page = await tabletPage(browser);
    page.on('pageerror', (e) => errors.push(e.message));
    const post = async (url: string, body: unknown, headers: Record<string, string> = {}) => {
      const res = await app.fetch(`${app.baseUrl}${url}`, { method: 'POST', body: JSON.stringify(body), headers: { 'content-type': 'application/json', ...headers } });
      if (!res.ok) throw new Error(`${url}: ${res.status} ${await res.text()}`);
      return res.json() as Promise<Record<string, unknown>>;
    };
    const campaign = (await post('/api/v1/campaigns', {
      name: 'Surface beds (split plot)',
      factors: [
        { name: 'surface', kind: 'continuous', unit: 'Shore A', low: 20, high: 80, hardToChange: true, changeMinutes: 45 },
        { name: 'payload', kind: 'continuous', unit: 'g', low: 0.2, high: 1.8 },
      ],
      responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
      robots: [{ name: 'Test hopper 1', massGrams: 1, heightMm: 45 }],
      rigs: [{ name: 'North bench' }, { name: 'South bench' }],
    })) as { campaign?: { id: string; rigs: { id: string }[] }; id?: string; rigs?: { id: string }[] };
    const c = campaign.campaign ?? (campaign as { id: string; rigs: { id: string }[] });
    id = c.id;
    await post(`/api/v1/campaigns/${id}/designs`, { method: 'optimal', model: 'main-effects', runs: 16, wholePlots: 8, seed: 3 });
    const { runs } = (await (await app.fetch(`${app.baseUrl}/api/v1/campaigns/${id}/runs`)).json()) as {
      runs: { id: string; plannedOrder: number; wholePlot: number | null; values: Record<string, number> }[];
    };
    runs.sort((a, b) => a.plannedOrder - b.plannedOrder);
    const start = Date.parse('2026-03-02T08:00:00Z');
    for (const [i, run] of runs.entries()) {
      const shift = [6, -4, 3, -7, 5, -2, 1, -3][(run.wholePlot ?? 0) % 8]!;
      const apex = 200 + 0.3 * (run.values.surface! - 50) - 15 * (run.values.payload! - 1) + shift + 2 * Math.sin(2.1 * i);
      await post(
        `/api/v1/campaigns/${id}/trials/log`,
        {
          runId: run.id,
          rigId: c.rigs[i % 2]!.id,
          operator: 'op',
          startedAt: new Date(start + i * 600_000).toISOString(),
          finishedAt: new Date(start + i * 600_000 + 300_000).toISOString(),
          observations: { apex_height: Number(apex.toFixed(1)) },
          status: 'done',
        },
        { 'Idempotency-Key': `split-plot-${i}-key` },
      );
    }
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('fits the split plot and says which error each term is tested against', async () => {
    await page.goto(`${app.baseUrl}/campaigns/${id}/analysis`);
    await page.getByLabel('Model').selectOption('main-effects');
    await page.getByRole('button', { name: 'Fit model' }).click();
    const summary = page.getByTestId('split-plot-summary');
    await summary.waitFor();
    expect(await summary.innerText()).toMatch(/surface tested against whole-plot error, [\d.]+ df/);
    expect(await summary.innerText()).toMatch(/payload tested against subplot error/);
    expect(await summary.innerText()).toMatch(/Variance components: whole plot/);
    expect(await page.getByTestId('anova-table').innerText()).toMatch(/Error df \(KR\)/);
    expect(await page.getByRole('img', { name: /Residuals against run order/ }).count()).toBe(1);
    expect(await page.getByRole('img', { name: /Residuals by whole plot/ }).count()).toBe(1);
    expect(await page.getByRole('img', { name: /Residuals by rig/ }).count()).toBe(1);
    await screenshot(page, 'split-plot-findings');
    expect(errors).toEqual([]);
  });

  it('prints the same findings in the report', async () => {
    await page.goto(`${app.baseUrl}/campaigns/${id}/report`);
    expect(await page.getByTestId('split-plot-summary').innerText()).toMatch(/tested against whole-plot error/);
    expect(await page.getByRole('img', { name: /Residuals by whole plot/ }).count()).toBe(1);
    expect(await page.locator('table.data').last().innerText()).toMatch(/Whole plot/);
    await screenshot(page, 'split-plot-report');
    expect(errors).toEqual([]);
  });
});
