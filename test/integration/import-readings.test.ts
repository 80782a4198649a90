/**
 * Import of past trials with the standard rig readings on a real database (SQLite file or
 * PostgreSQL): a small CSV with apex height, hops, distance, energy and a failure reason is stored as
 * exactly the observations that logging the same trial at the rig stores (names, values, units), in
 * one transaction with the audit event; a bad row is reported with its line and column and nothing
 * is stored; the analysis fits an imported reading as it fits a logged one.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { trialImportSchema, trialLogSchema } from '@/server/api/schemas/rig';
import { closeDb, db } from '@/server/db/client';
import { campaignData, fitCampaign } from '@/server/repos/analyses';
import { importTrials } from '@/server/repos/imports';
import { logTrial } from '@/server/repos/rig-log';
import { listRuns } from '@/server/repos/runs';
import { freshDatabase } from './database';
import { rejection, rigCampaign } from './rig-campaign';

const NOW = new Date('2026-03-02T12:00:00Z');

describe('import of past trials with the standard rig readings', () => {
  let campaignId = '';
  let robotId = '';
  let rigId = '';

  beforeAll(async () => {
    await freshDatabase();
    // An invented campaign: the apex is declared as a response in cm; hops, distance and energy are not.
    ({ campaignId, robotId, rigId } = await rigCampaign({
      name: 'Imported readings campaign',
      responses: [
        { name: 'apex', unit: 'cm', goal: 'maximize' },
        { name: 'landing_score', unit: '', goal: 'maximize' },
      ],
      robot: 'Hopper T',
      rig: { name: 'Bench Q', timeZone: 'UTC' },
      seed: 3,
    }));
  });
  afterAll(async () => {
    await closeDb();
  });

  const header = 'payload (mg),gain,apex (cm),hops,distance (mm),energy (J),score,ok,why,start,end,robot,rig';
  const mapping = {
    'payload (mg)': 'payload',
    gain: 'gain',
    'apex (cm)': 'reading:apex_height',
    hops: 'hops_completed',
    'distance (mm)': 'distance_travelled',
    'energy (J)': 'reading:energy_drawn',
    score: 'landing_score',
    ok: 'passed',
    why: 'failureReason',
    start: 'startedAt',
    end: 'finishedAt',
    robot: 'robot',
    rig: 'rig',
  };
  const units = { 'payload (mg)': 'mg', 'apex (cm)': 'cm', 'distance (mm)': 'mm', 'energy (J)': 'J' };
  const rows = [
    '500,1,18,3,420,0.95,4,no,fell: tipped on landing,2026-03-01T09:00:00Z,2026-03-01T09:02:00Z,Hopper T,Bench Q',
    '1200,2,15,2,310,0.7,3,yes,,2026-03-01T09:10:00Z,2026-03-01T09:12:00Z,Hopper T,Bench Q',
    '0,0.5,21,4,505,1.1,5,yes,,2026-03-01T09:20:00Z,2026-03-01T09:22:00Z,Hopper T,Bench Q',
  ];
  const request = (lines: string[], extra: Record<string, unknown> = {}) =>
    trialImportSchema.parse({ csv: [header, ...lines].join('\n'), mapping, units, fileName: 'past-hops.csv', ...extra });

  async function observationsOf(trialId: string) {
    const stored = await (await db()).observation.findMany({ where: { trialId }, orderBy: { name: 'asc' } });
    return stored.map((o) => ({ name: o.name, value: o.value, unit: o.unit }));
  }

  async function importedCount(): Promise<number> {
    return (await db()).trial.count({ where: { campaignId, run: { source: 'import' } } });
  }

  it('reports a bad row with its line and column and stores nothing', async () => {
    const bad = '1000,1,450,2.5,300,0.8,3,yes,fell,2026-03-01T09:30:00Z,2026-03-01T09:32:00Z,Hopper T,Bench Q';
    const e = await rejection(importTrials(campaignId, request([...rows, bad]), 'tester', NOW));
    expect(e.code).toBe('invalid_input');
    expect(e.message).toMatch(/1 of 4 rows are invalid \(first on line 5: apex \(cm\) of 450 cm is beyond 3 m \(300 cm\)/);
    expect(await importedCount()).toBe(0);
    const dry = await importTrials(campaignId, request([...rows, bad], { dryRun: true }), 'tester', NOW);
    const invalid = dry.report.rows.filter((r) => r.errors.length > 0);
    expect(invalid.map((r) => r.line)).toEqual([5]);
    expect(invalid[0]!.errors.map((x) => [x.column, x.field])).toEqual([
      ['apex (cm)', 'apex'],
      ['hops', 'hops_completed'],
      ['why', 'failureReason'],
    ]);
    expect(invalid[0]!.errors[1]!.message).toBe('hops must be a whole number ≥ 0; got 2.5');
    expect(await importedCount()).toBe(0);
  });

  it('stores the readings exactly as logging the same trial at the rig stores them, with the audit event', async () => {
    const res = await importTrials(campaignId, request(rows), 'tester', NOW);
    expect(res.stored).toBe(3);
    expect(res.unmatched).toEqual([]);
    const client = await db();
    const imported = await client.trial.findMany({ where: { campaignId, run: { source: 'import' } }, orderBy: { startedAt: 'asc' }, include: { observations: true } });
    expect(imported).toHaveLength(3);
    expect(imported[0]!.observations.every((o) => o.origin === 'import')).toBe(true);

    // The first row logged at the rig: same readings, same pass/fail and reason.
    const runId = (await listRuns(campaignId)).find((r) => r.source !== 'import')!.id;
    const logged = await logTrial(
      campaignId,
      trialLogSchema.parse({
        runId,
        rigId,
        robotId,
        startedAt: '2026-03-01T09:00:00Z',
        finishedAt: '2026-03-01T09:02:00Z',
        status: 'failed',
        passed: false,
        failureReason: 'fell: tipped on landing',
        observations: { apex: 18, hops_completed: 3, distance_travelled: 420, energy_drawn: 950, landing_score: 4 },
      }),
      'imp-key-0001',
      'tester',
      NOW,
    );
    const atRig = await observationsOf(logged.trial.id);
    expect(atRig).toEqual([
      { name: 'apex', value: 18, unit: 'cm' },
      { name: 'distance_travelled', value: 420, unit: 'mm' },
      { name: 'energy_drawn', value: 950, unit: 'mJ' },
      { name: 'hops_completed', value: 3, unit: 'count' },
      { name: 'landing_score', value: 4, unit: '' },
    ]);
    expect(await observationsOf(imported[0]!.id)).toEqual(atRig);
    const first = imported[0]!;
    expect([first.status, first.passed, first.failureReason, first.rigId, first.robotId]).toEqual([logged.trial.status, logged.trial.passed, logged.trial.failureReason, rigId, robotId]);
    expect(first.startedAt.toISOString()).toBe('2026-03-01T09:00:00.000Z');
    expect(first.finishedAt?.toISOString()).toBe('2026-03-01T09:02:00.000Z');

    const events = await client.auditEvent.findMany({ where: { action: 'import-trials', entityId: campaignId } });
    expect(events).toHaveLength(1);
    expect(JSON.parse(events[0]!.afterJson ?? '{}')).toMatchObject({ fileName: 'past-hops.csv', rows: 3, stored: 3, observations: 15 });
  });

  it('feeds the imported readings to the campaign data and the fits as logged ones', async () => {
    const { rows: data } = await campaignData(campaignId);
    expect(data.map((r) => r.hops_completed).filter((v) => v !== undefined)).toEqual([3, 3, 2, 4]);
    const fit = await fitCampaign(campaignId, 'distance_travelled', 'main-effects', undefined, 'tester');
    expect(fit.n).toBe(4);
    expect(fit.response).toBe('distance_travelled');
  });
});
