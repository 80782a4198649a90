/**
 * The rig page after logging, in the browser at a tablet viewport on the built app: a motion track is
 * uploaded to a logged trial (columns mapped, mm and ms) and the per-hop table and the z(t) plot with
 * flight phases appear; a value is corrected with a reason and the original stays visible, struck
 * through; past trials are imported from a CSV with a row-by-row report, refused while a row is
 * invalid and stored only when the valid rows are explicitly accepted.
 * Ballistic relations of the synthetic track: a 0.20 m apex needs 1.98 m/s vertical takeoff speed and
 * about 0.40 s of flight (common practice, no source). Screenshots: test-results/rig-*.png.
 */
import { McapWriter, type IWritable } from '@mcap/core';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, startApp, tabletPage, type RunningApp } from './harness';

const G = 9.80665;

/** Three hops of apex `apex` m at 1 kHz, positions in mm and times in ms, 0.1 s stances. */
function ballisticTrackCsv(apex: number, hops: number, forwardSpeed: number): string {
  const vz = Math.sqrt(2 * G * apex);
  const flight = (2 * vz) / G;
  const stance = 0.1;
  const lines = ['time_ms,pos_x,pos_y,pos_z'];
  const total = stance + hops * (flight + stance);
  for (let i = 0; i * 0.001 <= total; i++) {
    const t = i * 0.001;
    let z = 0;
    let x = 0;
    if (t > stance) {
      const k = Math.floor((t - stance) / (flight + stance));
      const tin = t - stance - k * (flight + stance);
      if (k < hops && tin < flight) {
        z = vz * tin - 0.5 * G * tin * tin;
        x = (k * flight + tin) * forwardSpeed;
      } else x = Math.min(k + 1, hops) * flight * forwardSpeed;
    }
    lines.push(`${(t * 1000).toFixed(3)},${(x * 1000).toFixed(4)},0,${(z * 1000).toFixed(4)}`);
  }
  return lines.join('\n') + '\n';
}

/** The same track as an MCAP log: JSON pose messages on /robot/pose, metres and seconds. */
async function ballisticTrackMcap(apex: number, hops: number, forwardSpeed: number): Promise<Buffer> {
  const parts: Uint8Array[] = [];
  let size = 0n;
  const sink: IWritable = {
    write: async (b: Uint8Array) => {
      parts.push(b.slice());
      size += BigInt(b.byteLength);
    },
    position: () => size,
  };
  const writer = new McapWriter({ writable: sink, chunkSize: 8192 });
  await writer.start({ profile: '', library: 'saltus test' });
  const schemaId = await writer.registerSchema({ name: 'pose', encoding: 'jsonschema', data: new TextEncoder().encode('{"type":"object"}') });
  const channel = await writer.registerChannel({ topic: '/robot/pose', schemaId, messageEncoding: 'json', metadata: new Map() });
  const rows = ballisticTrackCsv(apex, hops, forwardSpeed).trim().split('\n').slice(1);
  let sequence = 0;
  for (const row of rows) {
    const [tMs, x, y, z] = row.split(',').map(Number);
    const t = tMs! / 1000;
    const logTime = BigInt(Math.round(t * 1e6)) * 1000n;
    const message = { t, pose: { position: { x: x! / 1000, y: y! / 1000, z: z! / 1000 } } };
    await writer.addMessage({ channelId: channel, sequence: sequence++, logTime, publishTime: logTime, data: new TextEncoder().encode(JSON.stringify(message)) });
  }
  await writer.end();
  return Buffer.concat(parts);
}

describe('tracks, corrections and import at the rig page', () => {
  let app: RunningApp;
  let browser: Browser;
  let page: Page;
  let campaignId = '';
  let rigUrl = '';
  const errors: string[] = [];

  async function api<T>(path: string, body?: unknown, headers: Record<string, string> = {}): Promise<T> {
    const res = await app.fetch(`${app.baseUrl}${path}`, {
      method: body === undefined ? 'GET' : 'POST',
      headers: { 'content-type': 'application/json', ...headers },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    if (!res.ok) throw new Error(`${path}: ${res.status} ${await res.text()}`);
    return (await res.json()) as T;
  }

  beforeAll(async () => {
    app = await startApp({ seed: false });
    browser = await launchBrowser();
    page = await tabletPage(browser);
    page.on('pageerror', (e) => errors.push(e.message));
    const campaign = await api<{ id: string; rigs: { id: string }[]; robots: { id: string }[] }>('/api/v1/campaigns', {
      name: 'Track bench check',
      factors: [
        { name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 1.8 },
        { name: 'gain', kind: 'continuous', low: 0.5, high: 2 },
      ],
      responses: [
        { name: 'apex_height', unit: 'mm', goal: 'maximize' },
        { name: 'hop_length', unit: 'mm', goal: 'maximize' },
        { name: 'energy', unit: 'mJ', goal: 'minimize' },
      ],
      robots: [{ name: 'Test hopper 3', massGrams: 1, heightMm: 45 }],
      rigs: [{ name: 'Bench C', timeZone: 'UTC', workdays: [1, 2, 3, 4, 5, 6, 7], startTime: '00:00', endTime: '23:59' }],
    });
    campaignId = campaign.id;
    await api(`/api/v1/campaigns/${campaignId}/designs`, { method: 'full-factorial', seed: 4 });
    await api(`/api/v1/campaigns/${campaignId}/schedule`, { startDate: new Date().toISOString().slice(0, 10), days: 3 });
    const runs = await api<{ runs: { id: string }[] }>(`/api/v1/campaigns/${campaignId}/runs`);
    await api(
      `/api/v1/campaigns/${campaignId}/trials/log`,
      { runId: runs.runs[0]!.id, rigId: campaign.rigs[0]!.id, robotId: campaign.robots[0]!.id, observations: { energy: 6 }, notes: 'track test' },
      { 'Idempotency-Key': 'e2e-track-0001' },
    );
    rigUrl = `${app.baseUrl}/campaigns/${campaignId}/rigs/${campaign.rigs[0]!.id}`;
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('1 · uploads a motion track and shows the per-hop table and the plot with flight phases shaded', async () => {
    await page.goto(rigUrl);
    const addTrack = page.getByRole('button', { name: /^Add a motion track to run \d+/ }).first();
    expect((await addTrack.boundingBox())!.height).toBeGreaterThanOrEqual(44);
    await addTrack.click();
    await page.getByLabel(/Motion track of run/).setInputFiles({ name: 'hops.csv', mimeType: 'text/csv', buffer: Buffer.from(ballisticTrackCsv(0.2, 3, 0.5)) });
    await page.getByLabel('Column for time').selectOption('time_ms');
    await page.getByLabel('Column for z').selectOption('pos_z');
    await page.getByLabel('Time unit').selectOption('ms');
    await page.getByLabel('Length unit').selectOption('mm');
    await page.getByRole('button', { name: 'Compute hops and store track' }).click();
    const table = page.getByTestId('hop-table');
    await expect.poll(() => table.locator('tbody tr').count(), { timeout: 20_000 }).toBe(3);
    // Apex ≈ 200 mm, flight ≈ 404 ms in every row.
    const apexCells = await table.locator('tbody tr td:nth-child(6)').allInnerTexts();
    for (const c of apexCells) expect(Number(c)).toBeCloseTo(200, -1);
    const flightCells = await table.locator('tbody tr td:nth-child(4)').allInnerTexts();
    for (const c of flightCells) expect(Math.abs(Number(c) - 404)).toBeLessThan(6);
    expect(await page.getByTestId('track-plot').locator('rect[data-hop]').count()).toBe(3);
    expect(await page.getByTestId('track-result').innerText()).toMatch(/apex_height 20\d(\.\d+)? mm/);
    await screenshot(page, 'rig-track');
    const trials = await api<{ trials: { observations: { name: string; origin: string }[] }[] }>(`/api/v1/campaigns/${campaignId}/trials`);
    expect(trials.trials[0]!.observations.find((o) => o.name === 'apex_height')!.origin).toBe('track');
  });

  it('2 · corrects a value with a reason; the original stays, struck through', async () => {
    await page.goto(rigUrl);
    await page.getByRole('button', { name: /^Correct a value of run \d+/ }).first().click();
    await page.getByLabel('Value to correct').selectOption('energy');
    await page.getByLabel('New value').fill('6.4');
    await page.getByLabel('Reason').fill('meter re-read after the trial');
    await page.getByRole('button', { name: 'Store correction' }).click();
    const card = page.getByTestId('logged-trial').first();
    await expect.poll(() => card.locator('del').count(), { timeout: 15_000 }).toBe(1);
    expect(await card.locator('del').innerText()).toBe('6');
    expect(await card.innerText()).toMatch(/6\.4/);
    await screenshot(page, 'rig-amendment');
  });

  it('3 · imports past trials: refused while a row is invalid, only valid rows when explicitly accepted', async () => {
    const csv = ['payload (mg),gain,apex (cm),ok', '500,1,18.2,yes', '2500,1,17,yes', '1200,2,15.1,no', ''].join('\n');
    await page.goto(`${app.baseUrl}/campaigns/${campaignId}/import`);
    await page.getByLabel(/Spreadsheet of past trials/).setInputFiles({ name: 'old.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
    await page.getByLabel('Column payload (mg) holds').selectOption('factor:payload');
    await page.getByLabel('Column apex (cm) holds').selectOption('response:apex_height');
    await page.getByLabel('Column ok holds').selectOption('field:passed');
    expect(await page.getByLabel('Column payload (mg) unit').inputValue()).toBe('mg');
    await page.getByRole('button', { name: 'Check file' }).click();
    const report = page.getByTestId('import-report');
    await expect.poll(() => report.innerText(), { timeout: 15_000 }).toMatch(/3 rows: 2 valid, 1 invalid/);
    expect(await report.innerText()).toMatch(/outside the range of 'payload'/);
    expect(await page.getByRole('button', { name: /^Import all/ }).count()).toBe(0);
    const partial = page.getByRole('button', { name: 'Import only the 2 valid rows' });
    expect(await partial.isDisabled()).toBe(true);
    await page.getByLabel(/Leave out the 1 invalid row/).check();
    await partial.click();
    await expect.poll(() => page.getByRole('status').first().innerText(), { timeout: 15_000 }).toMatch(/Imported 2 trials/);
    const runs = await api<{ runs: { source: string; state: string }[] }>(`/api/v1/campaigns/${campaignId}/runs`);
    expect(runs.runs.filter((r) => r.source === 'import').map((r) => r.state)).toEqual(['done', 'failed']);
    await screenshot(page, 'rig-import');
  });

  it('4 · reads the hops from an MCAP log for a chosen topic', async () => {
    await page.goto(rigUrl);
    await page.getByRole('button', { name: /^Add a motion track to run \d+/ }).first().click();
    await page.getByLabel(/Motion track of run/).setInputFiles({ name: 'hops.mcap', mimeType: 'application/octet-stream', buffer: await ballisticTrackMcap(0.15, 3, 0.4) });
    // The topic chooser lists the log's topics with their schema names and message counts.
    const chooser = page.getByLabel('Pose topic');
    await expect.poll(() => chooser.locator('option').allInnerTexts(), { timeout: 15_000 }).toEqual([expect.stringMatching(/^\/robot\/pose — pose \(\d+ messages\)$/)]);
    await chooser.selectOption('/robot/pose');
    await page.getByRole('button', { name: 'Compute hops and store track' }).click();
    const table = page.getByTestId('hop-table');
    await expect.poll(() => table.locator('tbody tr').count(), { timeout: 20_000 }).toBe(3);
    for (const c of await table.locator('tbody tr td:nth-child(6)').allInnerTexts()) expect(Number(c)).toBeCloseTo(150, -1);
    expect(await page.getByTestId('track-plot').locator('rect[data-hop]').count()).toBe(3);
    await screenshot(page, 'rig-track-mcap');
    expect(errors).toEqual([]);
  });
});
