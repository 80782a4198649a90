/**
 * The whole trial loop in the browser at a tablet viewport, on the built app and a fresh database:
 * 1 create a campaign (with a refused bad input first), 2 generate designs (full factorial, then a
 * face-centred central composite) and see the runs table, 3 place the runs on the rig, 4 start and
 * finish trials at the rig page with readings in units (an implausible reading refused), 5 fit a
 * first-order model and see coefficients and the ANOVA table, 6 propose the next trial and add it as
 * a new run. Screenshots: test-results/loop-*.png.
 */
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, startApp, tabletPage, type RunningApp } from './harness';

describe('the trial loop on a tablet', () => {
  let app: RunningApp;
  let browser: Browser;
  let page: Page;
  let campaignUrl = '';
  const errors: string[] = [];

  beforeAll(async () => {
    app = await startApp({ seed: false });
    browser = await launchBrowser();
    page = await tabletPage(browser);
    page.on('pageerror', (e) => errors.push(e.message));
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  async function campaignCount(): Promise<number> {
    const res = await app.fetch(`${app.baseUrl}/api/v1/campaigns`);
    return ((await res.json()) as { campaigns: unknown[] }).campaigns.length;
  }

  it('1 · creates a campaign, refusing a bad range first without storing anything', async () => {
    await page.goto(`${app.baseUrl}/campaigns/new`);
    await page.getByLabel('Campaign name').fill('Bench check of the test hopper');
    await page.getByLabel('Factor 1 name').fill('payload');
    await page.getByLabel('Factor 1 low').fill('2');
    await page.getByLabel('Factor 1 high').fill('0');
    await page.getByLabel('Factor 1 unit').fill('g');
    await page.getByRole('button', { name: 'Add factor' }).click();
    await page.getByLabel('Factor 2 name').fill('gain');
    await page.getByLabel('Factor 2 low').fill('0.5');
    await page.getByLabel('Factor 2 high').fill('2');
    await page.getByRole('button', { name: 'Add factor' }).click();
    await page.getByLabel('Factor 3 name').fill('drive');
    await page.getByLabel('Factor 3 low').fill('1.2');
    await page.getByLabel('Factor 3 high').fill('2');
    await page.getByLabel('Factor 3 unit').fill('kV');
    await page.getByLabel('Response 1 name').fill('apex_height');
    await page.getByLabel('Response 1 unit').fill('mm');
    await page.getByLabel('Robot 1 name').fill('Test hopper 1');
    await page.getByLabel('Robot 1 mass (g)').fill('0.95');
    await page.getByLabel('Robot 1 height (mm)').fill('45');
    await page.getByLabel('Rig 1 name').fill('Bench A');
    await page.getByLabel('Rig 1 opens').fill('00:00');
    await page.getByLabel('Rig 1 closes').fill('23:59');
    await page.getByRole('button', { name: 'Create campaign' }).click();
    const alert = page.getByTestId('error');
    await expect.poll(() => alert.innerText()).toContain('factors[0].high');
    expect(await alert.innerText()).toMatch(/greater than low/);
    expect(await campaignCount()).toBe(0);
    await screenshot(page, 'loop-1-refused');

    await page.getByLabel('Factor 1 low').fill('0');
    await page.getByLabel('Factor 1 high').fill('1.8');
    await page.getByRole('button', { name: 'Create campaign' }).click();
    await page.waitForURL(/\/campaigns\/(?!new$)[^/]+$/);
    await page.getByRole('heading', { level: 1, name: /Bench check/ }).waitFor();
    campaignUrl = page.url();
    expect(await page.locator('h1').innerText()).toContain('Bench check of the test hopper');
    expect(await campaignCount()).toBe(1);
  });

  it('2 · generates a full factorial and a face-centred central composite design with a seeded order', async () => {
    await page.getByLabel('Design method').selectOption('full-factorial');
    await page.getByLabel('Seed').fill('11');
    await page.getByRole('button', { name: 'Generate and commit design' }).click();
    await expect.poll(() => page.getByRole('status').innerText()).toMatch(/Design version 1 committed: 8 runs/);
    await expect.poll(() => page.getByTestId('runs-table').locator('tbody tr').count()).toBe(8);

    await page.getByLabel('Design method').selectOption('central-composite');
    await page.getByRole('button', { name: 'Generate and commit design' }).click();
    await expect.poll(() => page.getByRole('status').innerText()).toMatch(/Design version 2 committed/);
    const rows = page.getByTestId('runs-table').locator('tbody tr');
    await expect.poll(() => rows.count()).toBeGreaterThanOrEqual(15);
    expect(await page.getByTestId('design-summary').innerText()).toMatch(/central-composite/);
    await screenshot(page, 'loop-2-design');
  });

  it('3 · places the runs on the rig', async () => {
    await page.goto(`${campaignUrl}/schedule`);
    await page.getByRole('button', { name: 'Place runs' }).click();
    await expect.poll(() => page.getByRole('status').innerText()).toMatch(/Placed \d+ runs/);
    await expect.poll(() => page.getByTestId('rig-plan').locator('tbody tr').count()).toBeGreaterThanOrEqual(15);
    await screenshot(page, 'loop-3-week-plan');
  });

  it('4 · starts and finishes trials at the rig page with readings in units', async () => {
    await page.getByRole('link', { name: 'open rig log' }).first().click();
    await page.waitForURL(/\/rigs\//);
    expect(await page.getByRole('note', { name: 'Safety cautions' }).innerText()).toMatch(/high voltage/i);
    const startButtons = page.getByRole('button', { name: /^Start run \d+/ });
    const box = await startButtons.first().boundingBox();
    expect(box!.height).toBeGreaterThanOrEqual(44);

    // An implausible apex (5 m) is refused with the field named; the trial stays open.
    await startButtons.first().click();
    await page.getByLabel(/apex_height/).fill('5000');
    await page.getByRole('button', { name: 'Finish trial' }).click();
    await expect.poll(() => page.getByTestId('error').innerText()).toContain('observations.apex_height');
    await screenshot(page, 'loop-4-refused-reading');

    const apex = [182, 231, 160, 214, 199, 247, 175];
    for (let i = 0; i < apex.length; i++) {
      if (i > 0) {
        await page.getByRole('button', { name: /^Start run \d+/ }).first().click();
      }
      await page.getByLabel(/apex_height/).fill(String(apex[i]));
      await page.getByRole('button', { name: 'Finish trial' }).click();
      await expect.poll(() => page.getByRole('status').first().innerText()).toMatch(/logged/);
      await page.getByRole('button', { name: 'Finish trial' }).waitFor({ state: 'detached' });
    }
    await screenshot(page, 'loop-4-rig');
    const trials = await (await app.fetch(`${app.baseUrl}/api/v1/campaigns/${campaignUrl.split('/').pop()}/trials`)).json();
    expect((trials as { trials: { status: string }[] }).trials.filter((t) => t.status === 'done')).toHaveLength(apex.length);
  });

  it('5 · fits a first-order model and shows coefficients with standard errors and the ANOVA table', async () => {
    await page.goto(`${campaignUrl}/analysis`);
    await page.getByLabel('Model').selectOption('main-effects');
    await page.getByRole('button', { name: 'Fit model' }).click();
    const coef = page.getByTestId('coefficients-table');
    await expect.poll(() => coef.locator('tbody tr').count()).toBe(4);
    expect(await coef.innerText()).toMatch(/Std\. error/);
    const anova = page.getByTestId('anova-table');
    expect(await anova.innerText()).toMatch(/Residual/);
    expect(await anova.innerText()).toMatch(/Total/);
    await page.getByRole('heading', { name: 'What drives apex_height' }).waitFor();
    expect(await page.getByRole('img', { name: /Effects on apex_height/ }).count()).toBe(1);
    await screenshot(page, 'loop-5-findings');
  });

  it('6 · proposes the next trial and adds it to the campaign as a new run', async () => {
    const id = campaignUrl.split('/').pop();
    const before = ((await (await app.fetch(`${app.baseUrl}/api/v1/campaigns/${id}/runs`)).json()) as { runs: unknown[] }).runs.length;
    await page.goto(`${campaignUrl}/next`);
    await page.getByRole('button', { name: 'Propose next trial' }).click();
    await expect.poll(() => page.getByTestId('proposal').innerText()).toMatch(/prediction variance/);
    await page.getByRole('button', { name: 'Add to campaign as a new run' }).click();
    await expect.poll(() => page.getByRole('status').innerText()).toMatch(/as run \d+/);
    const after = ((await (await app.fetch(`${app.baseUrl}/api/v1/campaigns/${id}/runs`)).json()) as { runs: unknown[] }).runs.length;
    expect(after).toBe(before + 1);
    await screenshot(page, 'loop-6-next-trial');
  });

  it('7 · suggests a batch from the Gaussian-process surrogate with a reason for each trial', async () => {
    await page.getByLabel('Trials', { exact: true }).fill('3');
    await page.getByRole('button', { name: 'Suggest a batch' }).click();
    const batch = page.getByTestId('surrogate-batch');
    await batch.waitFor({ timeout: 60_000 });
    expect(await batch.getByRole('checkbox', { name: 'Add this trial' }).count()).toBe(3);
    expect(await batch.innerText()).toMatch(/Gaussian process/);
    await screenshot(page, 'loop-7-surrogate');
    expect(errors).toEqual([]);
  });
});
