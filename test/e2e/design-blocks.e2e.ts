/**
 * The design form with blocks (production build, chromium at iPad size): a two-level full factorial in
 * two blocks with a block generator the engineer names. A one-letter word is refused beside the field
 * (nothing committed); "ABC" commits 8 runs in two blocks of 4, each run's block the sign of A·B·C.
 */
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, startApp, tabletPage, type RunningApp } from './harness';

interface RunRow {
  block: number | null;
  values: Record<string, number | string>;
}

describe('design form: blocks with named generators', () => {
  let app: RunningApp;
  let browser: Browser;
  let page: Page;
  let campaignId = '';

  beforeAll(async () => {
    app = await startApp({ seed: false });
    browser = await launchBrowser();
    page = await tabletPage(browser);
    const res = await app.fetch(`${app.baseUrl}/api/v1/campaigns`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({
        name: 'Blocked screening of an invented hopper',
        factors: [
          { name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 1.8 },
          { name: 'gain', kind: 'continuous', low: 0.5, high: 2 },
          { name: 'stiffness', kind: 'continuous', unit: 'N/m', low: 40, high: 90 },
        ],
        responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
        rigs: [{ name: 'Bench B' }],
      }),
    });
    expect(res.status).toBe(201);
    campaignId = ((await res.json()) as { id: string }).id;
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  async function runs(): Promise<RunRow[]> {
    const res = await app.fetch(`${app.baseUrl}/api/v1/campaigns/${campaignId}/runs`);
    return ((await res.json()) as { runs: RunRow[] }).runs;
  }

  it('refuses a one-letter generator beside the field, then commits ABC in two blocks', async () => {
    await page.goto(`${app.baseUrl}/campaigns/${campaignId}`);
    await page.getByLabel('Design method').selectOption('full-factorial');
    await page.getByLabel('Blocks').fill('2');
    const generators = page.getByLabel('Block generators (optional)');
    await generators.fill('A');
    await page.getByRole('button', { name: 'Generate and commit design' }).click();
    await expect.poll(async () => (await generators.getAttribute('aria-invalid')) ?? '').toBe('true');
    await expect.poll(() => page.getByTestId('error').first().innerText()).toMatch(/blockGenerators/);
    expect(await runs()).toHaveLength(0);
    await screenshot(page, 'design-blocks-refused');

    await generators.fill('ABC');
    await page.getByRole('button', { name: 'Generate and commit design' }).click();
    await expect.poll(() => page.getByRole('status').innerText()).toMatch(/Design version 1 committed: 8 runs/);
    const stored = await runs();
    expect(stored).toHaveLength(8);
    const sign = (r: RunRow, name: string, mid: number) => (Number(r.values[name]) > mid ? 1 : -1);
    const blockOf = new Map<number, number[]>();
    for (const r of stored) {
      const abc = sign(r, 'payload', 0.9) * sign(r, 'gain', 1.25) * sign(r, 'stiffness', 65);
      blockOf.set(abc, [...(blockOf.get(abc) ?? []), r.block ?? 0]);
    }
    // Each sign of A·B·C is one block of four runs, and the two blocks differ.
    const blocks = [...blockOf.values()].map((bs) => new Set(bs));
    expect(blocks).toHaveLength(2);
    for (const b of blocks) expect(b.size).toBe(1);
    expect([...blocks[0]!][0]).not.toBe([...blocks[1]!][0]);
    expect([...blockOf.values()].map((bs) => bs.length)).toEqual([4, 4]);
    await screenshot(page, 'design-blocks-committed');
  });
});
