/**
 * The rig log's store under races, on a real database (on PostgreSQL this is the one-statement write):
 * copies of one entry racing store one trial and one audit event, the rest answer `exists`; entries
 * with different keys for one run without `repeat` store the run once and refuse the rest as already
 * logged; a run of another campaign is refused and stores nothing; the rows read back through Prisma are
 * exactly what the store answered and what the entry holds, field by field, on either database.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { closeDb, db } from '@/server/db/client';
import { createCampaign } from '@/server/repos/campaigns';
import { commitDesign, listRuns } from '@/server/repos/runs';
import { LOG_TRIAL_ACTION, storeLoggedTrial, type LogOutcome, type LogWrite } from '@/server/repos/trial-log-store';
import { freshDatabase } from './database';

const NOW = new Date('2026-04-07T10:15:30.125Z');

async function campaignWithRuns(name: string) {
  const c = await createCampaign(
    campaignCreateSchema.parse({
      name,
      factors: [{ name: 'spring_rate', kind: 'continuous', unit: 'N/mm', low: 1, high: 3 }],
      responses: [
        { name: 'apex_height', unit: 'mm', goal: 'maximize' },
        { name: 'energy', unit: 'mJ', goal: 'minimize' },
      ],
      rigs: [{ name: 'Bench Q' }],
    }),
    'tester',
  );
  await commitDesign(c.id, { method: 'full-factorial', model: 'main-effects', seed: 11 }, 'tester');
  return { id: c.id, rigId: c.rigs[0]!.id, runIds: (await listRuns(c.id)).map((r) => r.id) };
}

describe('rig log store under races', () => {
  let a: Awaited<ReturnType<typeof campaignWithRuns>>;
  let b: Awaited<ReturnType<typeof campaignWithRuns>>;

  beforeAll(async () => {
    await freshDatabase();
    a = await campaignWithRuns('Race campaign A');
    b = await campaignWithRuns('Race campaign B');
  });
  afterAll(async () => {
    await closeDb();
  });

  const write = (runId: string, key: string, extra: Partial<LogWrite> = {}): LogWrite => ({
    campaignId: a.id,
    runId,
    rigId: a.rigId,
    robotId: null,
    operator: 'op race',
    status: 'done',
    passed: true,
    failureReason: '',
    notes: `entry ${key}`,
    startedAt: new Date('2026-04-07T10:10:00.000Z'),
    finishedAt: new Date('2026-04-07T10:12:00.250Z'),
    idempotencyKey: key,
    repeat: true,
    observations: [
      { name: 'apex_height', value: 151.25, unit: 'mm' },
      { name: 'energy', value: 3.5, unit: 'mJ' },
    ],
    actor: 'tester',
    now: NOW,
    ...extra,
  });

  it('20 copies of one entry at once: one trial, one audit event, the others answer exists', async () => {
    const w = write(a.runIds[0]!, 'race-same-key');
    const outcomes = await Promise.all(Array.from({ length: 20 }, () => storeLoggedTrial(w)));
    expect(outcomes.filter((o) => o.kind === 'stored')).toHaveLength(1);
    expect(outcomes.filter((o) => o.kind === 'exists')).toHaveLength(19);
    const client = await db();
    const trials = await client.trial.findMany({ where: { idempotencyKey: 'race-same-key' } });
    expect(trials).toHaveLength(1);
    expect(await client.auditEvent.count({ where: { entity: 'trial', entityId: trials[0]!.id } })).toBe(1);
    expect(await client.observation.count({ where: { trialId: trials[0]!.id } })).toBe(2);
  });

  it('10 entries for one run at once without repeat: stored once, the rest refused as already logged', async () => {
    const run = a.runIds[1]!;
    const settled = await Promise.allSettled(
      Array.from({ length: 10 }, (_, k) => storeLoggedTrial(write(run, `race-run-${k}`, { repeat: false }))),
    );
    const stored = settled.filter((s): s is PromiseFulfilledResult<LogOutcome> => s.status === 'fulfilled');
    expect(stored).toHaveLength(1);
    expect(stored[0]!.value.kind).toBe('stored');
    const first = (stored[0]!.value as Extract<LogOutcome, { kind: 'stored' }>).trial;
    for (const s of settled.filter((s): s is PromiseRejectedResult => s.status === 'rejected')) {
      const e = s.reason as DomainError;
      expect(e).toBeInstanceOf(DomainError);
      expect(e.code).toBe('conflict');
      expect(e.field).toBe('runId');
      const details = e.details as { trialId: string; currentVersion: number; stored: { runId: string; observations: Record<string, number> }; amendments: unknown[] };
      expect(details.trialId).toBe(first.id);
      expect(details.currentVersion).toBe(2);
      expect(details.stored).toEqual({ runId: run, status: 'done', passed: true, failureReason: '', notes: first.notes, observations: { apex_height: 151.25, energy: 3.5 } });
      expect(details.amendments).toEqual([]);
    }
    const client = await db();
    expect(await client.trial.count({ where: { runId: run } })).toBe(1);
    expect(await client.auditEvent.count({ where: { entity: 'trial', entityId: first.id } })).toBe(1);
  });

  it('a run of another campaign is refused naming runId, and nothing is stored', async () => {
    const client = await db();
    const counts = async () => [await client.trial.count(), await client.observation.count(), await client.auditEvent.count()];
    const before = await counts();
    for (const repeat of [true, false]) {
      const refused = await storeLoggedTrial(write(b.runIds[0]!, `race-foreign-${repeat}`, { repeat })).catch((e: unknown) => e);
      expect(refused).toBeInstanceOf(DomainError);
      expect((refused as DomainError).field).toBe('runId');
      expect((refused as DomainError).code).toBe('invalid_input');
    }
    expect(await counts()).toEqual(before);
  });

  it('stores the rows field by field as the entry holds them, and answers exactly those rows', async () => {
    const w = write(a.runIds[0]!, 'race-fields', {
      robotId: null,
      rigId: null,
      status: 'failed',
      passed: null,
      failureReason: 'spring slipped',
      notes: 'quote \' and backslash \\ and ünïcode',
      observations: [
        { name: 'apex_height', value: 0.1 + 0.2, unit: 'mm' },
        { name: 'energy', value: -1.5e-7, unit: 'mJ' },
        { name: 'hops_completed', value: 3, unit: '' },
      ],
    });
    const outcome = await storeLoggedTrial(w);
    expect(outcome.kind).toBe('stored');
    const answered = (outcome as Extract<LogOutcome, { kind: 'stored' }>).trial;
    expect(answered.id).toMatch(/^c[0-9a-z]{24}$/);
    const expected = {
      id: answered.id,
      campaignId: a.id,
      runId: a.runIds[0],
      robotId: null,
      rigId: null,
      status: 'failed',
      passed: null,
      failureReason: 'spring slipped',
      operator: 'op race',
      notes: w.notes,
      startedAt: w.startedAt,
      finishedAt: w.finishedAt,
      idempotencyKey: 'race-fields',
      version: 2,
      createdAt: NOW,
    };
    const client = await db();
    const row = await client.trial.findUniqueOrThrow({ where: { id: answered.id }, include: { observations: true } });
    const { observations: rowObservations, ...rowFields } = row;
    const { observations: answeredObservations, ...answeredFields } = answered;
    expect(rowFields).toEqual(expected);
    expect(answeredFields).toEqual(expected);
    const byName = <T extends { name: string }>(xs: T[]) => [...xs].sort((x, y) => x.name.localeCompare(y.name));
    expect(byName(rowObservations)).toEqual(byName(answeredObservations));
    expect(byName(rowObservations).map(({ trialId, name, value, unit, origin }) => ({ trialId, name, value, unit, origin }))).toEqual([
      { trialId: answered.id, name: 'apex_height', value: 0.1 + 0.2, unit: 'mm', origin: 'typed' },
      { trialId: answered.id, name: 'energy', value: -1.5e-7, unit: 'mJ', origin: 'typed' },
      { trialId: answered.id, name: 'hops_completed', value: 3, unit: '', origin: 'typed' },
    ]);
    for (const o of rowObservations) expect(o.id).toMatch(/^c[0-9a-z]{24}$/);
    const events = await client.auditEvent.findMany({ where: { entity: 'trial', entityId: answered.id } });
    expect(events).toHaveLength(1);
    const { id: eventId, ...event } = events[0]!;
    expect(eventId).toMatch(/^c[0-9a-z]{24}$/);
    expect(event).toEqual({
      at: NOW,
      actor: 'tester',
      action: LOG_TRIAL_ACTION,
      entity: 'trial',
      entityId: answered.id,
      beforeJson: null,
      afterJson: JSON.stringify({
        runId: a.runIds[0],
        startedAt: w.startedAt,
        finishedAt: w.finishedAt,
        status: 'failed',
        passed: null,
        observations: { apex_height: 0.1 + 0.2, energy: -1.5e-7, hops_completed: 3 },
      }),
    });
    // The same entry again: answered as stored before, nothing new.
    expect(await storeLoggedTrial(w)).toEqual({ kind: 'exists' });
    expect(await client.trial.count({ where: { idempotencyKey: 'race-fields' } })).toBe(1);
  });
});
