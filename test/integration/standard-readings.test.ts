/**
 * Standard rig readings on a real database (SQLite file or PostgreSQL): apex height, hops completed,
 * distance travelled and electrical energy drawn are accepted on every campaign, stored as
 * observations under their fixed names and units unless a campaign response stands for them (then
 * under the response, entered once); implausible values are refused naming the field, storing nothing;
 * the analysis can fit a standard reading as a response.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { trialLogSchema } from '@/server/api/schemas/rig';
import { closeDb, db } from '@/server/db/client';
import { campaignData, fitCampaign } from '@/server/repos/analyses';
import { logTrial } from '@/server/repos/rig-log';
import { listRuns } from '@/server/repos/runs';
import { finishTrial, startTrial } from '@/server/repos/trials';
import { freshDatabase } from './database';
import { rejection, rigCampaign } from './rig-campaign';

const NOW = new Date('2026-03-02T12:00:00Z');

describe('standard rig readings on a real database', () => {
  let campaignId = '';
  let runIds: string[] = [];
  let robotId = '';
  let rigId = '';

  beforeAll(async () => {
    await freshDatabase();
    // The campaign declares an apex response in cm and one response of its own; no hops, distance or energy.
    ({ campaignId, robotId, rigId, runIds } = await rigCampaign({
      name: 'Standard readings campaign',
      responses: [
        { name: 'apex', unit: 'cm', goal: 'maximize' },
        { name: 'landing_score', unit: '', goal: 'maximize' },
      ],
      robot: 'R1',
      rig: { name: 'Bench A', timeZone: 'UTC' },
      seed: 5,
    }));
  });
  afterAll(async () => {
    await closeDb();
  });

  const entry = (runId: string, observations: Record<string, number>, extra: Record<string, unknown> = {}) =>
    trialLogSchema.parse({ runId, rigId, robotId, startedAt: '2026-03-02T11:50:00Z', finishedAt: '2026-03-02T11:52:00Z', observations, ...extra });

  async function observationsOf(trialId: string) {
    const rows = await (await db()).observation.findMany({ where: { trialId }, orderBy: { name: 'asc' } });
    return rows.map((o) => ({ name: o.name, value: o.value, unit: o.unit }));
  }

  async function trialCount(): Promise<number> {
    return (await db()).trial.count({ where: { campaignId } });
  }

  it('stores the standard readings under fixed names and units, the apex under the campaign response', async () => {
    const r = await logTrial(campaignId, entry(runIds[0]!, { apex: 18, hops_completed: 3, distance_travelled: 420, energy_drawn: 950, landing_score: 4 }), 'std-key-0001', 'tester', NOW);
    expect(r.replayed).toBe(false);
    expect(await observationsOf(r.trial.id)).toEqual([
      { name: 'apex', value: 18, unit: 'cm' },
      { name: 'distance_travelled', value: 420, unit: 'mm' },
      { name: 'energy_drawn', value: 950, unit: 'mJ' },
      { name: 'hops_completed', value: 3, unit: 'count' },
      { name: 'landing_score', value: 4, unit: '' },
    ]);
  });

  it('refuses a second apex field: the response stands for the standard reading (no double entry)', async () => {
    const e = await rejection(logTrial(campaignId, entry(runIds[1]!, { apex: 18, apex_height: 180 }), 'std-key-0002', 'tester', NOW));
    expect(e.field).toBe('observations.apex_height');
    expect(e.message).toMatch(/not a reading of this campaign; known: apex, hops_completed, distance_travelled, energy_drawn, landing_score/);
    expect(await trialCount()).toBe(1);
  });

  it('refuses negative energy and an apex of several metres naming the field and its unit; nothing stored', async () => {
    const energy = await rejection(logTrial(campaignId, entry(runIds[1]!, { energy_drawn: -5 }), 'std-key-0003', 'tester', NOW));
    expect(energy.field).toBe('observations.energy_drawn');
    expect(energy.message).toMatch(/energy_drawn of -5 mJ is negative/);
    const apex = await rejection(logTrial(campaignId, entry(runIds[1]!, { apex: 450 }), 'std-key-0003', 'tester', NOW));
    expect(apex.field).toBe('observations.apex');
    expect(apex.message).toMatch(/apex of 450 cm is beyond 3 m \(300 cm\); check the unit \(this field is in cm\)/);
    expect(await trialCount()).toBe(1);
  });

  it('questions more hops than fit in the trial time, naming the field, and stores the entry', async () => {
    // 2 min trial; a 0.20 m apex is about 0.40 s in the air per hop (common practice, no source).
    const warned = await logTrial(campaignId, entry(runIds[1]!, { apex: 20, hops_completed: 700 }), 'std-key-0004', 'tester', NOW);
    const hops = warned.warnings.find((w) => w.field === 'observations.hops_completed');
    expect(hops?.message).toMatch(/700 hops to 20 cm take at least 28\d\.\d s in the air, but the trial lasted 120\.0 s/);
    expect(await trialCount()).toBe(2);
  });

  it('checks the separate finish route the same way', async () => {
    const started = await startTrial(campaignId, { runId: runIds[2]!, rigId, robotId, operator: '', startedAt: '2026-03-02T11:58:00Z' }, null, 'tester', NOW);
    const e = await rejection(finishTrial(campaignId, started.trial.id, { observations: { distance_travelled: -1 }, failureReason: '', notes: '', status: 'done' }, 'tester', NOW));
    expect(e.field).toBe('observations.distance_travelled');
    const failed = await finishTrial(campaignId, started.trial.id, { observations: { distance_travelled: 35 }, failureReason: 'fell: tipped on landing', notes: '', status: 'failed', passed: false }, 'tester', NOW);
    expect(failed.trial.failureReason).toBe('fell: tipped on landing');
    expect(failed.trial.observations.find((o) => o.name === 'distance_travelled')?.unit).toBe('mm');
  });

  it('puts the standard readings in the campaign data the fits use', async () => {
    const { rows } = await campaignData(campaignId);
    expect(rows.map((r) => r.energy_drawn).filter((v) => v !== undefined)).toEqual([950]);
    expect(rows.map((r) => r.distance_travelled).filter((v) => v !== undefined).sort((a, b) => Number(a) - Number(b))).toEqual([35, 420]);
  });

  it('fits a standard reading the campaign did not declare as a response', async () => {
    // Three more trials with energy drawn on the untried runs of the 2 × 3 design.
    const runs = await listRuns(campaignId);
    const energy = [700, 820, 1010];
    for (let i = 0; i < energy.length; i++) {
      await logTrial(campaignId, entry(runs[3 + i]!.id, { energy_drawn: energy[i]! }), `std-key-fit-${i}`, 'tester', NOW);
    }
    const fit = await fitCampaign(campaignId, 'energy_drawn', 'main-effects', undefined, 'tester');
    expect(fit.n).toBe(4);
    expect(fit.response).toBe('energy_drawn');
    const e = await rejection(fitCampaign(campaignId, 'apex_height', 'main-effects', undefined, 'tester'));
    expect(e.field).toBe('response');
    expect(e.message).toMatch(/known: apex, landing_score, hops_completed, distance_travelled, energy_drawn|known: apex, hops_completed/);
  });
});
