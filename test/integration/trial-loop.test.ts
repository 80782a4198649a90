/**
 * The campaign loop through the repositories on a real database (SQLite file or PostgreSQL):
 * create → design → place → log → fit → propose → accept, plus the guarantees a rig log needs:
 * idempotent starts, refused readings store nothing, conflicting finishes answer 409, corrections are
 * amendments that keep the original, and every change leaves an audit event.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { closeDb, db } from '@/server/db/client';
import { fitCampaign } from '@/server/repos/analyses';
import { createCampaign, getCampaign } from '@/server/repos/campaigns';
import { commitDesign, listRuns } from '@/server/repos/runs';
import { placeRuns } from '@/server/repos/schedule';
import { acceptSuggestion, proposeNextTrial } from '@/server/repos/suggestions';
import { amendTrial, finishTrial, startTrial } from '@/server/repos/trials';
import { freshDatabase } from './database';

const NOW = new Date('2026-03-02T12:00:00Z');

describe('campaign loop on a real database', () => {
  let campaignId = '';

  beforeAll(async () => {
    await freshDatabase();
  });
  afterAll(async () => {
    await closeDb();
  });

  it('creates a campaign with factors, responses, robots and rigs', async () => {
    const input = campaignCreateSchema.parse({
      name: 'Integration campaign',
      factors: [
        { name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 1.8 },
        { name: 'gain', kind: 'discrete', values: [0.5, 1, 2] },
        { name: 'surface', kind: 'categorical', levels: ['turf', 'glass'], hardToChange: true, changeMinutes: 40 },
      ],
      responses: [
        { name: 'apex_height', unit: 'mm', goal: 'maximize' },
        { name: 'energy', unit: 'mJ', goal: 'minimize' },
      ],
      robots: [{ name: 'R1', massGrams: 1, heightMm: 45 }],
      rigs: [{ name: 'Bench A', timeZone: 'Europe/Berlin', startTime: '08:00', endTime: '18:00' }],
    });
    const c = await createCampaign(input, 'tester');
    campaignId = c.id;
    expect(c.factors.map((f) => f.name)).toEqual(['payload', 'gain', 'surface']);
    expect(c.factors[2]).toMatchObject({ kind: 'categorical', levels: ['turf', 'glass'], hardToChange: true, changeMinutes: 40 });
    expect(c.rigs[0]).toMatchObject({ timeZone: 'Europe/Berlin', workdays: [1, 2, 3, 4, 5] });
  });

  it('commits a seeded full factorial and withdraws only untried runs on a new design', async () => {
    const first = await commitDesign(campaignId, { method: 'full-factorial', model: 'main-effects', seed: 5 }, 'tester');
    expect(first.runs).toBe(2 * 3 * 2);
    const runs = await listRuns(campaignId);
    expect(runs).toHaveLength(12);
    expect(new Set(runs.map((r) => r.plannedOrder)).size).toBe(12);
    // Same seed, same order: a second commit of the same spec gives the same sequence of settings.
    const again = await commitDesign(campaignId, { method: 'full-factorial', model: 'main-effects', seed: 5 }, 'tester');
    expect(again.withdrawn).toBe(12);
    const runs2 = await listRuns(campaignId);
    expect(runs2.map((r) => r.values)).toEqual(runs.map((r) => r.values));
  });

  it('places runs on the rig inside its working hours with surface changeovers', async () => {
    const result = await placeRuns(campaignId, '2026-03-02', 5, 'tester');
    expect(result.assignments).toHaveLength(12);
    expect(result.unscheduled).toEqual([]);
    for (const a of result.assignments) {
      const hour = Number(new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/Berlin', hour: '2-digit', hourCycle: 'h23' }).format(new Date(a.start)));
      expect(hour).toBeGreaterThanOrEqual(8);
      expect(hour).toBeLessThan(18);
    }
    const runs = await listRuns(campaignId);
    expect(runs.every((r) => r.state === 'scheduled')).toBe(true);
  });

  it('starts a trial once per idempotency key', async () => {
    const [run] = await listRuns(campaignId);
    const c = await getCampaign(campaignId);
    const a = await startTrial(campaignId, { runId: run!.id, rigId: c.rigs[0]!.id, robotId: c.robots[0]!.id, operator: 'op' }, 'key-0001-aaaa', 'tester', NOW);
    const b = await startTrial(campaignId, { runId: run!.id, rigId: c.rigs[0]!.id, robotId: c.robots[0]!.id, operator: 'op' }, 'key-0001-aaaa', 'tester', NOW);
    expect(b.replayed).toBe(true);
    expect(b.trial.id).toBe(a.trial.id);
    const client = await db();
    expect(await client.trial.count({ where: { campaignId } })).toBe(1);
  });

  it('refuses an implausible reading, naming the field, and stores nothing', async () => {
    const client = await db();
    const trial = await client.trial.findFirstOrThrow({ where: { campaignId } });
    const err = await finishTrial(campaignId, trial.id, { observations: { apex_height: 5000, energy: 2 }, status: 'done', failureReason: '', notes: '' }, 'tester', NOW).catch((e) => e);
    expect(err).toBeInstanceOf(DomainError);
    expect(err.field).toBe('observations.apex_height');
    const negative = await finishTrial(campaignId, trial.id, { observations: { apex_height: 150, energy: -3 }, status: 'done', failureReason: '', notes: '' }, 'tester', NOW).catch((e) => e);
    expect(negative.field).toBe('observations.energy');
    expect(await client.observation.count({ where: { trialId: trial.id } })).toBe(0);
    expect((await client.trial.findUniqueOrThrow({ where: { id: trial.id } })).status).toBe('running');
  });

  it('finishes a trial once; a stale version is a conflict; a correction is an amendment keeping the original', async () => {
    const client = await db();
    const trial = await client.trial.findFirstOrThrow({ where: { campaignId } });
    const done = await finishTrial(campaignId, trial.id, { observations: { apex_height: 182, energy: 4.1 }, status: 'done', failureReason: '', notes: '', version: 1 }, 'tester', NOW);
    expect(done.trial.status).toBe('done');
    const again = await finishTrial(campaignId, trial.id, { observations: { apex_height: 999, energy: 1 }, status: 'done', failureReason: '', notes: '', version: 1 }, 'tester', NOW).catch((e) => e);
    expect(again.code).toBe('conflict');
    const amendment = await amendTrial(campaignId, trial.id, { field: 'apex_height', newValue: 185, reason: 'camera calibration corrected' }, 'tester');
    expect(amendment).toMatchObject({ oldValue: '182', newValue: '185' });
    const obs = await client.observation.findFirstOrThrow({ where: { trialId: trial.id, name: 'apex_height' } });
    expect(obs.value).toBe(185);
    const audit = await client.auditEvent.findMany({ where: { entityId: trial.id }, orderBy: { at: 'asc' } });
    expect(audit.map((a) => a.action)).toEqual(['start-trial', 'finish-trial', 'amend']);
  });

  it('fits the logged trials, proposes the next trial and accepts it as a new run', async () => {
    const runs = await listRuns(campaignId);
    const apex = [160, 201, 175, 222, 190, 240, 168];
    for (const [i, run] of runs.slice(1, 1 + apex.length).entries()) {
      const { trial } = await startTrial(campaignId, { runId: run.id, operator: 'op' }, `key-fit-${i}-xxxx`, 'tester', NOW);
      await finishTrial(campaignId, trial.id, { observations: { apex_height: apex[i]!, energy: 3 + i / 10 }, status: 'done', failureReason: '', notes: '' }, 'tester', NOW);
    }
    const fit = await fitCampaign(campaignId, 'apex_height', 'main-effects', undefined, 'tester');
    expect(fit.n).toBe(8);
    expect(fit.result.coefficients.map((c) => c.term)[0]).toBe('(Intercept)');
    expect(fit.result.anova.at(-1)!.source).toBe('Total');
    const proposal = await proposeNextTrial(campaignId, 'main-effects', 3, 'tester');
    expect(Object.keys(proposal.values).sort()).toEqual(['gain', 'payload', 'surface']);
    const before = (await listRuns(campaignId)).length;
    const accepted = await acceptSuggestion(campaignId, proposal.id, 'tester');
    const replay = await acceptSuggestion(campaignId, proposal.id, 'tester');
    expect(replay.run.id).toBe(accepted.run.id);
    expect((await listRuns(campaignId)).length).toBe(before + 1);
  });

  it('reads a campaign with thousands of trials without exceeding the database parameter limit', async () => {
    const client = await db();
    const [run] = await listRuns(campaignId);
    const rows = Array.from({ length: 2500 }, (_, i) => ({
      campaignId,
      runId: run!.id,
      status: 'done',
      startedAt: new Date(NOW.getTime() - (i + 1) * 60_000),
      finishedAt: new Date(NOW.getTime() - i * 60_000),
      idempotencyKey: `bulk-${i}-key`,
    }));
    for (let i = 0; i < rows.length; i += 500) await client.trial.createMany({ data: rows.slice(i, i + 500) });
    const { trialsOf } = await import('@/server/repos/trials');
    const { campaignData } = await import('@/server/repos/analyses');
    expect((await trialsOf(campaignId)).length).toBeGreaterThanOrEqual(2500);
    expect((await campaignData(campaignId)).rows.length).toBeGreaterThanOrEqual(2500);
    expect((await listRuns(campaignId)).length).toBeGreaterThan(0);
  });
});
