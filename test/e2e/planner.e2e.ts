/**
 * Planner and week grid in the browser at a tablet viewport, on the built app with the invented demo
 * campaign: 1 compare two candidate designs (a full factorial and a split-plot optimal design) and
 * commit the second; 2 place its runs and see changeover blocks on the week grid; 3 try to sort the
 * runs inside a whole plot by payload and see the move refused with the reason, then move the plot
 * as it is; 4 open a printable day sheet; 5 download a rig's iCalendar file (RFC 5545) with one
 * VEVENT per placed run. Screenshots: test-results/planner-*.png.
 */
import { readFileSync } from 'node:fs';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, startApp, tabletPage, type RunningApp } from './harness';

/** A Monday at least two weeks ahead, as yyyy-MM-dd (after the demo's own slots). */
function mondayAhead(): string {
  const d = new Date(Date.now() + 14 * 86_400_000);
  while (d.getUTCDay() !== 1) d.setUTCDate(d.getUTCDate() + 1);
  return d.toISOString().slice(0, 10);
}

describe('planner page and week grid on a tablet', () => {
  let app: RunningApp;
  let browser: Browser;
  let page: Page;
  let id = '';
  let runsB = 0;
  const errors: string[] = [];
  const firstDay = mondayAhead();

  beforeAll(async () => {
    app = await startApp({ seed: true });
    browser = await launchBrowser();
    page = await tabletPage(browser, { acceptDownloads: true });
    page.on('pageerror', (e) => errors.push(e.message));
    const list = (await (await app.fetch(`${app.baseUrl}/api/v1/campaigns`)).json()) as { campaigns: { id: string; isDemo?: boolean }[] };
    id = list.campaigns[0]!.id;
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('1 · compares two candidate designs side by side and commits one', async () => {
    await page.goto(`${app.baseUrl}/campaigns/${id}`);
    await page.getByRole('link', { name: 'Compare candidate designs' }).click();
    await page.waitForURL(/\/planner$/);
    expect(await page.getByLabel('Candidate A method').inputValue()).toBe('full-factorial');
    expect(await page.getByLabel('Candidate B method').inputValue()).toBe('optimal');
    expect(Number(await page.getByLabel('Candidate B whole plots').inputValue())).toBeGreaterThanOrEqual(2);
    runsB = Number(await page.getByLabel('Candidate B runs').inputValue());
    expect(runsB).toBeGreaterThan(15); // the interactions model of the demo has 15 parameters
    await page.getByRole('button', { name: 'Compare candidates' }).click();
    // The optimal candidate is searched as a job; its design joins the table when the job is done.
    await expect.poll(() => page.getByTestId('job').getAttribute('data-status'), { timeout: 90_000 }).toBe('done');
    const table = page.getByTestId('comparison-table');
    await table.waitFor({ timeout: 60_000 });
    expect(await table.locator('thead th').count()).toBe(3);
    const text = await table.innerText();
    for (const label of ['D-efficiency', 'I-efficiency', 'Largest VIF', 'Lowest term power', 'Whole plots']) expect(text).toContain(label);
    expect(await page.getByTestId('correlation-map').count()).toBe(2);
    expect(await page.getByTestId('fds-chart').locator('path').count()).toBe(2);
    expect(await page.getByTestId('power-table').locator('tbody tr').count()).toBeGreaterThan(3);
    await screenshot(page, 'planner-1-compare');

    await page.getByRole('button', { name: 'Commit candidate B' }).click();
    await expect.poll(() => page.getByRole('status').innerText(), { timeout: 60_000 }).toMatch(new RegExp(`Candidate B committed as design version 2: ${runsB} runs`));
    const runs = ((await (await app.fetch(`${app.baseUrl}/api/v1/campaigns/${id}/runs`)).json()) as { runs: { state: string; wholePlot: number | null }[] }).runs;
    const open = runs.filter((r) => r.state === 'planned');
    expect(open).toHaveLength(runsB);
    expect(new Set(open.map((r) => r.wholePlot)).size).toBeGreaterThanOrEqual(2);
  });

  it('2 · places the runs and shows trials and changeover blocks on the week grid', async () => {
    await page.goto(`${app.baseUrl}/campaigns/${id}/schedule`);
    await page.getByLabel('First day').fill(firstDay);
    await page.getByRole('button', { name: 'Place runs' }).click();
    await expect.poll(() => page.getByRole('status').innerText(), { timeout: 30_000 }).toMatch(new RegExp(`Placed ${runsB} runs`));
    // The page re-renders on the server after placing; the grid then opens on the week of the new runs.
    const grid = page.getByTestId('week-grid');
    await expect.poll(() => grid.getByTestId('trial-block').count(), { timeout: 30_000 }).toBe(runsB);
    expect(await grid.getByTestId('changeover').count()).toBeGreaterThan(0);
    expect(await grid.getByTestId('changeover').first().innerText()).toMatch(/change surface →/);
    // One table row per placed run under each rig (the 16 demo trials already run included).
    await expect.poll(() => page.getByTestId('rig-plan').locator('tbody tr').count(), { timeout: 30_000 }).toBe(16 + runsB);
    await screenshot(page, 'planner-2-week-grid');
  });

  it('3 · refuses sorting the runs inside a whole plot and says why, then moves the plot as it is', async () => {
    const panel = page.getByTestId('move-panel');
    // The form opens on the first plot's current rig, day and time.
    expect(await panel.getByLabel('New day').inputValue()).toBe(firstDay);
    const plots = await panel.getByLabel('Whole plot').locator('option').all();
    let chosen = '';
    for (const option of plots) {
      const value = (await option.getAttribute('value'))!;
      await panel.getByLabel('Whole plot').selectOption(value);
      const sorted = await panel.getByLabel('Run order inside the plot').locator('option', { hasText: 'sorted by payload' }).innerText();
      if (!sorted.includes('same as design order')) {
        chosen = value;
        break;
      }
    }
    expect(chosen).not.toBe('');
    await panel.getByLabel('Run order inside the plot').selectOption('payload');
    await panel.getByRole('button', { name: 'Move whole plot' }).click();
    const alert = panel.getByTestId('error');
    await expect.poll(() => alert.innerText(), { timeout: 30_000 }).toContain('runOrder');
    expect(await alert.innerText()).toMatch(/randomis/);
    expect(await alert.innerText()).toMatch(/split-plot/);
    await screenshot(page, 'planner-3-refused-move');

    // The same plot in design order to the other rig, the day after the plan: accepted and stored.
    const rigs = await panel.getByLabel('Move to rig').locator('option').all();
    const current = await panel.getByLabel('Move to rig').inputValue();
    const other = (await Promise.all(rigs.map((o) => o.getAttribute('value')))).find((v) => v !== current)!;
    await panel.getByLabel('Move to rig').selectOption(other);
    const next = new Date(Date.parse(`${firstDay}T12:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
    await panel.getByLabel('New day').fill(next);
    await panel.getByLabel('Start time').fill('09:00');
    await panel.getByLabel('Run order inside the plot').selectOption('design');
    await panel.getByRole('button', { name: 'Move whole plot' }).click();
    await expect.poll(() => panel.getByRole('status').innerText(), { timeout: 30_000 }).toMatch(/Moved whole plot \d+: \d+ runs to /);
    await expect.poll(() => page.locator(`td[data-day="${next}"]`).getByTestId('trial-block').count(), { timeout: 30_000 }).toBeGreaterThan(0);
    await screenshot(page, 'planner-3-moved');
  });

  it('4 · opens a printable day sheet of a rig', async () => {
    await page.getByRole('link', { name: 'printable day sheet' }).last().click();
    await page.waitForURL(/\/schedule\/day\?/);
    const sheet = page.getByTestId('day-sheet');
    await expect.poll(() => sheet.locator('tbody tr').count(), { timeout: 30_000 }).toBeGreaterThan(0);
    await screenshot(page, 'planner-4-day-sheet');
    const print = page.getByRole('button', { name: 'Print this sheet' });
    await print.waitFor();
    expect(await print.isVisible()).toBe(true);
    await page.emulateMedia({ media: 'print' });
    expect(await print.isVisible()).toBe(false);
    expect(await page.getByRole('navigation', { name: 'Campaign steps' }).isVisible()).toBe(false);
    await screenshot(page, 'planner-4-day-sheet-print');
    await page.emulateMedia({ media: 'screen' });
  });

  it('5 · downloads a rig calendar (RFC 5545) with one VEVENT per placed run', async () => {
    await page.goto(`${app.baseUrl}/campaigns/${id}/schedule`);
    const section = page.getByTestId('rig-plan').first();
    const placed = await section.locator('tbody tr').count();
    expect(placed).toBeGreaterThan(0);
    const [download] = await Promise.all([page.waitForEvent('download'), section.getByRole('link', { name: 'iCalendar file' }).click()]);
    expect(download.suggestedFilename()).toMatch(/\.ics$/);
    // Unfold content lines (RFC 5545 §3.1) before reading them.
    const ics = readFileSync((await download.path())!, 'utf8').replace(/\r\n[ \t]/g, '');
    expect(ics.startsWith('BEGIN:VCALENDAR')).toBe(true);
    expect(ics.trimEnd().endsWith('END:VCALENDAR')).toBe(true);
    const trials = ics.match(/^UID:trial-/gm) ?? [];
    const changeovers = ics.match(/^UID:changeover-/gm) ?? [];
    expect(trials).toHaveLength(placed);
    // UIDs carry the campaign, so another campaign's run of the same number on this rig stays a separate event.
    expect(ics.match(/^UID:.*@saltus$/gm)!.every((uid) => uid.includes(id))).toBe(true);
    expect(ics.match(/^BEGIN:VEVENT/gm)).toHaveLength(placed + changeovers.length);
    expect(errors).toEqual([]);
  });
});
