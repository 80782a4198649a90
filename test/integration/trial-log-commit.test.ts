/**
 * The rig log's write path under concurrency, on a real database (SQLite file or PostgreSQL): entries
 * that arrive together are stored exactly once each with their observations and one audit event in the
 * same transaction; on SQLite they share group commits (fewer transactions than entries); a refused
 * entry is answered alone and stores nothing; rows written by the hot path read back through Prisma
 * exactly as written; an open Prisma transaction on the same connection is never joined.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { trialLogSchema } from '@/server/api/schemas/rig';
import { closeDb, db } from '@/server/db/client';
import { databaseConfig } from '@/server/db/config';
import { cachedCampaign, createCampaign, forgetCampaign } from '@/server/repos/campaigns';
import { logTrial } from '@/server/repos/rig-log';
import { commitDesign, listRuns } from '@/server/repos/runs';
import { logCommitStats } from '@/server/repos/trial-log-store';
import { amendTrial, trialsOf } from '@/server/repos/trials';
import { freshDatabase } from './database';

const NOW = new Date('2026-03-03T09:00:00Z');

describe('rig log write path under concurrency', () => {
  let campaignId = '';
  let runIds: string[] = [];
  let rigId = '';

  beforeAll(async () => {
    await freshDatabase();
    const c = await createCampaign(
      campaignCreateSchema.parse({
        name: 'Concurrent logging',
        factors: [{ name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 2 }],
        responses: [
          { name: 'apex_height', unit: 'mm', goal: 'maximize' },
          { name: 'energy', unit: 'mJ', goal: 'minimize' },
        ],
        rigs: [{ name: 'Bench C' }],
      }),
      'tester',
    );
    campaignId = c.id;
    rigId = c.rigs[0]!.id;
    await commitDesign(campaignId, { method: 'full-factorial', model: 'main-effects', seed: 5 }, 'tester');
    runIds = (await listRuns(campaignId)).map((r) => r.id);
  });
  afterAll(async () => {
    await closeDb();
  });

  const entry = (k: number, extra: Record<string, unknown> = {}) =>
    trialLogSchema.parse({
      runId: runIds[k % runIds.length],
      rigId,
      operator: `op ${k}`,
      startedAt: '2026-03-03T08:50:00Z',
      finishedAt: '2026-03-03T08:52:00.250Z',
      observations: { apex_height: 150 + k, energy: 3.5 },
      notes: `entry ${k}`,
      repeat: true,
      ...extra,
    });

  it('stores 40 concurrent entries (with duplicate copies and one refused entry) exactly once each', async () => {
    const before = await logCommitStats();
    const keys = Array.from({ length: 40 }, (_, k) => `commit-key-${String(k).padStart(4, '0')}`);
    const requests = [
      ...keys.map((key, k) => logTrial(campaignId, entry(k), key, 'tester', NOW)),
      // second copies of five entries, sent at the same moment
      ...keys.slice(0, 5).map((key, k) => logTrial(campaignId, entry(k), key, 'tester', NOW)),
      logTrial(campaignId, entry(99, { runId: 'no-such-run' }), 'commit-key-bad-run', 'tester', NOW),
    ];
    const settled = await Promise.allSettled(requests);
    const refused = settled[settled.length - 1]!;
    expect(refused.status).toBe('rejected');
    const reason = (refused as PromiseRejectedResult).reason as DomainError;
    expect(reason).toBeInstanceOf(DomainError);
    expect(reason.field).toBe('runId');
    const answered = settled.slice(0, -1).map((s) => {
      expect(s.status).toBe('fulfilled');
      return (s as PromiseFulfilledResult<Awaited<ReturnType<typeof logTrial>>>).value;
    });
    expect(answered.filter((a) => !a.replayed)).toHaveLength(40);
    for (let k = 0; k < 5; k++) expect(answered[40 + k]!.trial.id).toBe(answered[k]!.trial.id);

    const client = await db();
    const stored = await client.trial.findMany({ where: { campaignId }, include: { observations: true } });
    expect(stored).toHaveLength(40);
    expect(new Set(stored.map((t) => t.idempotencyKey))).toEqual(new Set(keys));
    for (const t of stored) {
      const k = Number(t.idempotencyKey!.slice(-4));
      expect(t.status).toBe('done');
      expect(t.passed).toBe(true);
      expect(t.version).toBe(2);
      expect(t.operator).toBe(`op ${k}`);
      expect(t.startedAt.toISOString()).toBe('2026-03-03T08:50:00.000Z');
      expect(t.finishedAt!.toISOString()).toBe('2026-03-03T08:52:00.250Z');
      expect(Object.fromEntries(t.observations.map((o) => [o.name, [o.value, o.unit]]))).toEqual({ apex_height: [150 + k, 'mm'], energy: [3.5, 'mJ'] });
    }
    const events = await client.auditEvent.findMany({ where: { entity: 'trial', action: 'log-trial' } });
    expect(events).toHaveLength(40);
    const byTrial = new Map(events.map((e) => [e.entityId, JSON.parse(e.afterJson!) as { observations: Record<string, number> }]));
    for (const t of stored) expect(byTrial.get(t.id)!.observations.apex_height).toBe(t.observations.find((o) => o.name === 'apex_height')!.value);

    const after = await logCommitStats();
    if (databaseConfig().provider === 'sqlite') {
      // 46 requests, far fewer transactions: they were grouped.
      expect(after!.commits - before!.commits).toBeLessThan(40);
      expect(after!.largestBatch).toBeGreaterThan(1);
    } else {
      expect(after).toBeNull();
    }
    // The campaign's trial list (Prisma) reads the rows the hot path wrote.
    expect(await trialsOf(campaignId)).toHaveLength(40);
  });

  it('without repeat, a second entry for a logged run is refused with both versions, also within one batch', async () => {
    const run = runIds[0]!;
    const [a, b] = await Promise.allSettled([
      logTrial(campaignId, entry(0, { runId: run, repeat: false, observations: { apex_height: 171 } }), 'commit-key-run-a', 'tester', NOW),
      logTrial(campaignId, entry(0, { runId: run, repeat: false, observations: { apex_height: 172 } }), 'commit-key-run-b', 'tester', NOW),
    ]);
    // The run already has trials from the first test: both are refused, nothing stored.
    for (const r of [a, b]) {
      expect(r.status).toBe('rejected');
      const e = (r as PromiseRejectedResult).reason as DomainError;
      expect(e.code).toBe('conflict');
      expect(e.field).toBe('runId');
      expect((e.details as { stored: { runId: string } }).stored.runId).toBe(run);
    }
    expect(await (await db()).trial.count({ where: { idempotencyKey: { startsWith: 'commit-key-run-' } } })).toBe(0);
  });

  it('keeps working beside a Prisma transaction open on the same connection', async () => {
    const client = await db();
    const first = await client.trial.findFirstOrThrow({ where: { campaignId }, orderBy: { id: 'asc' } });
    const results = await Promise.all([
      amendTrial(campaignId, first.id, { field: 'energy', newValue: 3.6, reason: 'meter re-read' }, 'tester'),
      ...Array.from({ length: 10 }, (_, k) => logTrial(campaignId, entry(200 + k), `commit-key-side-${k}`, 'tester', NOW)),
    ]);
    expect(results).toHaveLength(11);
    expect(await client.trial.count({ where: { idempotencyKey: { startsWith: 'commit-key-side-' } } })).toBe(10);
    const amended = await client.observation.findFirstOrThrow({ where: { trialId: first.id, name: 'energy' } });
    expect(amended.value).toBe(3.6);
  });

  it('holds the campaign definition in memory until it is forgotten after a change', async () => {
    const client = await db();
    const a = await cachedCampaign(campaignId);
    expect(await cachedCampaign(campaignId)).toBe(a);
    // A change to the definition (here written directly) is seen once the cache entry is dropped.
    await client.response.updateMany({ where: { campaignId, name: 'energy' }, data: { unit: 'J' } });
    expect((await cachedCampaign(campaignId)).responses.find((r) => r.name === 'energy')!.unit).toBe('mJ');
    forgetCampaign(campaignId);
    expect((await cachedCampaign(campaignId)).responses.find((r) => r.name === 'energy')!.unit).toBe('J');
    const logged = await logTrial(campaignId, entry(300), 'commit-key-after-change', 'tester', NOW);
    expect(logged.trial.observations.find((o) => o.name === 'energy')!.unit).toBe('J');
    // An unknown campaign is refused and not remembered.
    await expect(cachedCampaign('no-such-campaign')).rejects.toMatchObject({ code: 'not_found' });
  });
});
