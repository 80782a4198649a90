/**
 * The rig page's server side on a real database (SQLite file or PostgreSQL): the combined idempotent
 * log entry a tablet replays from its offline queue (stored exactly once, conflicts answered with both
 * versions), a motion track stored with its per-hop metrics and derived observations, and the
 * all-or-nothing import of past trials.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { STANDARD_GRAVITY } from '@/domain/metrics/ballistics';
import { trialImportSchema, trialLogSchema } from '@/server/api/schemas/rig';
import { closeDb, db } from '@/server/db/client';
import { getCampaign } from '@/server/repos/campaigns';
import { campaignData } from '@/server/repos/analyses';
import { importTrials } from '@/server/repos/imports';
import { getTrial, logTrial } from '@/server/repos/rig-log';
import { listRuns } from '@/server/repos/runs';
import { storeMcapTrack, storeTrack } from '@/server/repos/tracks';
import { McapWriter } from '@mcap/core';
import { MemoryWritable } from '../unit/tracks/mcap-build';
import { amendTrial } from '@/server/repos/trials';
import { freshDatabase } from './database';
import { rejection, rigCampaign } from './rig-campaign';

const NOW = new Date('2026-03-02T12:00:00Z');

/**
 * A track of `hops` ballistic hops of apex `apex` m at 1 kHz in mm and ms, with 0.1 s stances and a
 * few blank rows (dropouts). Ballistic relations: a 0.20 m apex needs 1.98 m/s vertical takeoff speed
 * and about 0.40 s of flight (common practice, no source).
 */
function ballisticTrackCsv(apex: number, hops: number, forwardSpeed: number): string {
  const vz = Math.sqrt(2 * STANDARD_GRAVITY * apex);
  const flight = (2 * vz) / STANDARD_GRAVITY;
  const stance = 0.1;
  const lines = ['time_ms,pos_x,pos_y,pos_z'];
  let x = 0;
  let t = 0;
  const dt = 0.001;
  const total = stance + hops * (flight + stance);
  let row = 0;
  for (; t <= total + 1e-9; t += dt, row++) {
    const cycle = (t - stance) / (flight + stance);
    let z = 0;
    if (t > stance) {
      const k = Math.floor(cycle);
      const tin = t - stance - k * (flight + stance);
      if (k < hops && tin < flight) {
        z = vz * tin - 0.5 * STANDARD_GRAVITY * tin * tin;
        x = k * forwardSpeed * flight + forwardSpeed * tin;
      } else {
        x = Math.min(k + 1, hops) * forwardSpeed * flight;
      }
    }
    if (row % 97 === 50) lines.push(`${(t * 1000).toFixed(3)},,,`);
    else lines.push(`${(t * 1000).toFixed(3)},${(x * 1000).toFixed(4)},0,${(z * 1000).toFixed(4)}`);
  }
  return lines.join('\n') + '\n';
}

/** The same ballistic track as an MCAP log: JSON pose messages on /robot/pose, metres and seconds. */
async function ballisticTrackMcap(apex: number, hops: number, forwardSpeed: number): Promise<Uint8Array> {
  const rows = ballisticTrackCsv(apex, hops, forwardSpeed).trim().split('\n').slice(1).map((l) => l.split(','));
  const sink = new MemoryWritable();
  const writer = new McapWriter({ writable: sink, chunkSize: 8192 });
  await writer.start({ profile: '', library: 'saltus test' });
  const schemaId = await writer.registerSchema({ name: 'pose', encoding: 'jsonschema', data: new TextEncoder().encode('{"type":"object"}') });
  const channel = await writer.registerChannel({ topic: '/robot/pose', schemaId, messageEncoding: 'json', metadata: new Map() });
  let sequence = 0;
  for (const [tMs, x, y, z] of rows) {
    if (x === '' || z === '') continue;
    const t = Number(tMs) / 1000;
    const message = { pose: { position: { x: Number(x) / 1000, y: Number(y) / 1000, z: Number(z) / 1000 }, orientation: { x: 0, y: 0, z: 0, w: 1 } }, t };
    const logTime = BigInt(Math.round(t * 1e6)) * 1000n;
    await writer.addMessage({ channelId: channel, sequence: sequence++, logTime, publishTime: logTime, data: new TextEncoder().encode(JSON.stringify(message)) });
  }
  await writer.end();
  return sink.bytes();
}

describe('rig page server side on a real database', () => {
  let campaignId = '';
  let runIds: string[] = [];
  let robotId = '';
  let rigId = '';

  beforeAll(async () => {
    await freshDatabase();
    ({ campaignId, robotId, rigId, runIds } = await rigCampaign({
      name: 'Rig page campaign',
      responses: [
        { name: 'apex_height', unit: 'mm', goal: 'maximize' },
        { name: 'energy', unit: 'mJ', goal: 'minimize' },
        { name: 'hop_length', unit: 'mm', goal: 'maximize' },
        { name: 'cost_of_transport', goal: 'minimize' },
      ],
      robot: 'R1',
      rig: { name: 'Bench A', timeZone: 'Europe/Berlin', startTime: '08:00', endTime: '18:00' },
      seed: 3,
    }));
  });
  afterAll(async () => {
    await closeDb();
  });

  const entry = (runId: string, extra: Record<string, unknown> = {}) =>
    trialLogSchema.parse({
      runId,
      rigId,
      robotId,
      operator: 'op',
      startedAt: '2026-03-02T11:50:00Z',
      finishedAt: '2026-03-02T11:52:00Z',
      observations: { apex_height: 182, energy: 4.2 },
      notes: 'queued offline',
      ...extra,
    });

  async function trialCount(): Promise<number> {
    return (await db()).trial.count({ where: { campaignId } });
  }

  it('stores a combined start + finish once; a replay with the same key stores nothing new', async () => {
    const first = await logTrial(campaignId, entry(runIds[0]!), 'log-key-0001', 'tester', NOW);
    expect(first.replayed).toBe(false);
    expect(first.trial.status).toBe('done');
    expect(first.trial.version).toBe(2);
    expect(Object.fromEntries(first.trial.observations.map((o) => [o.name, o.value]))).toEqual({ apex_height: 182, energy: 4.2 });
    const again = await logTrial(campaignId, entry(runIds[0]!), 'log-key-0001', 'tester', NOW);
    expect(again.replayed).toBe(true);
    expect(again.trial.id).toBe(first.trial.id);
    // Concurrent replays of one key also store once.
    const both = await Promise.all([0, 1, 2].map(() => logTrial(campaignId, entry(runIds[1]!), 'log-key-0002', 'tester', NOW)));
    expect(new Set(both.map((b) => b.trial.id)).size).toBe(1);
    expect(await trialCount()).toBe(2);
  });

  it('refuses an implausible reading and stores nothing, not even the start', async () => {
    const e = await rejection(logTrial(campaignId, entry(runIds[2]!, { observations: { apex_height: 5000 } }), 'log-key-0003', 'tester', NOW));
    expect(e.code).toBe('invalid_input');
    expect(e.field).toBe('observations.apex_height');
    const f = await rejection(logTrial(campaignId, entry(runIds[2]!, { finishedAt: '2026-03-02T13:30:00Z' }), 'log-key-0003', 'tester', NOW));
    expect(f.field).toBe('finishedAt');
    expect(await trialCount()).toBe(2);
    // The corrected entry with the same key is stored.
    const ok = await logTrial(campaignId, entry(runIds[2]!, { observations: { apex_height: 199 } }), 'log-key-0003', 'tester', NOW);
    expect(ok.replayed).toBe(false);
    expect(await trialCount()).toBe(3);
  });

  it('answers 409 with both versions when the stored trial was amended since, or the run was logged elsewhere', async () => {
    const [stored] = await (await db()).trial.findMany({ where: { idempotencyKey: 'log-key-0001' } });
    await amendTrial(campaignId, stored!.id, { field: 'apex_height', newValue: 185, reason: 'video re-read' }, 'tester');
    const e = await rejection(logTrial(campaignId, entry(runIds[0]!), 'log-key-0001', 'tester', NOW));
    expect(e.code).toBe('conflict');
    const details = e.details as { stored: { observations: Record<string, number> }; sent: { observations: Record<string, number> } };
    expect(details.stored.observations.apex_height).toBe(185);
    expect(details.sent.observations.apex_height).toBe(182);

    // A second tablet logs the same run under its own key: shown, not stored ...
    const other = await rejection(logTrial(campaignId, entry(runIds[0]!, { observations: { apex_height: 170 } }), 'log-key-tab2', 'tester', NOW));
    expect(other.code).toBe('conflict');
    expect(other.field).toBe('runId');
    expect((other.details as { sent: { observations: Record<string, number> } }).sent.observations.apex_height).toBe(170);
    expect(await trialCount()).toBe(3);
    // ... until the operator chooses to keep both as a repeat trial.
    const repeat = await logTrial(campaignId, entry(runIds[0]!, { observations: { apex_height: 170 }, repeat: true }), 'log-key-tab2', 'tester', NOW);
    expect(repeat.replayed).toBe(false);
    expect(await trialCount()).toBe(4);
    const original = await getTrial(campaignId, stored!.id);
    expect(original.observations.find((o) => o.name === 'apex_height')!.value).toBe(185);
    expect(original.amendments[0]).toMatchObject({ oldValue: '182', newValue: '185' });
  });

  it('stores a track, derives observations from its hops and keeps typed values (apex 0.20 m, 3 hops)', async () => {
    const logged = await logTrial(campaignId, entry(runIds[3]!, { observations: { energy: 6 } }), 'log-key-0004', 'tester', NOW);
    const csv = ballisticTrackCsv(0.2, 3, 0.5);
    const res = await storeTrack(
      campaignId,
      logged.trial.id,
      csv,
      { time: 'time_ms', x: 'pos_x', y: 'pos_y', z: 'pos_z', lengthUnit: 'mm', timeUnit: 'ms', fileName: 'hop3.csv' },
      'tester',
    );
    expect(res.metrics.hops).toHaveLength(3);
    for (const hop of res.metrics.hops) {
      expect(hop.apexHeight).toBeCloseTo(0.2, 2);
      expect(hop.flightTime).toBeCloseTo(0.404, 2);
      expect(hop.takeoffSpeed).toBeGreaterThan(1.98);
    }
    const byName = Object.fromEntries(res.stored.map((s) => [s.name, s]));
    expect(byName.apex_height!.value).toBeCloseTo(200, -1);
    expect(byName.hop_length!.value).toBeCloseTo(0.5 * 0.404 * 1000, -1);
    // Energy 6 mJ typed, mass 1 g from the robot → cost of transport from the track.
    expect(byName.cost_of_transport!.value).toBeGreaterThan(0);
    expect(res.kept).toEqual([]);
    const trial = await getTrial(campaignId, logged.trial.id);
    expect(trial.tracks).toHaveLength(1);
    expect(trial.tracks[0]!.fileName).toBe('hop3.csv');
    expect(trial.observations.find((o) => o.name === 'apex_height')!.origin).toBe('track');
    expect(trial.observations.find((o) => o.name === 'energy')!.origin).toBe('typed');

    // On a trial with a typed apex, the typed value stays and both are answered.
    const typed = await (await db()).trial.findFirstOrThrow({ where: { idempotencyKey: 'log-key-0003' } });
    const second = await storeTrack(campaignId, typed.id, csv, { time: 'time_ms', x: 'pos_x', y: 'pos_y', z: 'pos_z', lengthUnit: 'mm', timeUnit: 'ms' }, 'tester');
    expect(second.kept).toHaveLength(1);
    expect(second.kept[0]).toMatchObject({ name: 'apex_height', typed: 199 });
    const after = await getTrial(campaignId, typed.id);
    expect(after.observations.find((o) => o.name === 'apex_height')!.value).toBe(199);

    // The same hops from an MCAP log of one chosen topic.
    const mcap = await ballisticTrackMcap(0.2, 3, 0.5);
    const fromLog = await storeMcapTrack(campaignId, typed.id, mcap, { topic: '/robot/pose', fileName: 'hop3.mcap' }, 'tester');
    expect(fromLog.metrics.hops).toHaveLength(3);
    for (const hop of fromLog.metrics.hops) expect(hop.apexHeight).toBeCloseTo(0.2, 2);
    expect(fromLog.profile.t.length).toBeGreaterThan(100);
    expect(Math.max(...fromLog.profile.z)).toBeCloseTo(0.2, 2);
    const wrongTopic = await rejection(storeMcapTrack(campaignId, typed.id, mcap, { topic: '/robot/imu' }, 'tester'));
    expect(wrongTopic.field).toBe('topic');
    expect(wrongTopic.message).toMatch(/\/robot\/pose/);
    expect((await getTrial(campaignId, typed.id)).tracks).toHaveLength(2);

    const bad = await rejection(storeTrack(campaignId, typed.id, csv, { time: 'time_ms', x: 'pos_x', y: 'pos_y', z: 'height', lengthUnit: 'mm', timeUnit: 'ms' }, 'tester'));
    expect(bad.code).toBe('invalid_input');
  });

  describe('import of past trials: all or nothing', () => {
    const header = 'payload (mg),gain,apex (cm),ok,why,when';
    const good = ['500,1,18.2,yes,,2025-11-03T10:00:00Z', '1200,2,15.1,no,fell,2025-11-03T10:30:00Z', '0,0.5,21.0,yes,,2025-11-03 11:00'];
    const badRows = ['2500,1,17,yes,,2025-11-03T12:00:00Z', 'x,1,17,yes,,2025-11-03T12:10:00Z'];
    const mapping = { 'payload (mg)': 'payload', gain: 'gain', 'apex (cm)': 'apex_height', ok: 'passed', why: 'failureReason', when: 'startedAt' };
    const units = { 'payload (mg)': 'mg', 'apex (cm)': 'cm' };
    const request = (rows: string[], extra: Record<string, unknown> = {}) => trialImportSchema.parse({ csv: [header, ...rows].join('\n'), mapping, units, fileName: 'old.csv', ...extra });

    async function importedRuns(): Promise<number> {
      return (await db()).run.count({ where: { campaignId, source: 'import' } });
    }

    it('refuses a file with invalid rows and stores nothing; a dry run only reports', async () => {
      const before = await trialCount();
      const e = await rejection(importTrials(campaignId, request([...good, ...badRows]), 'tester', NOW));
      expect(e.code).toBe('invalid_input');
      expect(e.message).toMatch(/2 of 5 rows are invalid/);
      expect(await importedRuns()).toBe(0);
      expect(await trialCount()).toBe(before);
      const dry = await importTrials(campaignId, request([...good, ...badRows], { dryRun: true }), 'tester', NOW);
      expect(dry.stored).toBe(0);
      expect(dry.report.validCount).toBe(3);
      expect(dry.report.rows.filter((r) => r.errors.length).map((r) => r.line)).toEqual([5, 6]);
      expect(await importedRuns()).toBe(0);
    });

    it('stores only the valid rows when the user explicitly accepts that', async () => {
      const res = await importTrials(campaignId, request([...good, ...badRows], { acceptValidRowsOnly: true }), 'tester', NOW);
      expect(res.stored).toBe(3);
      expect(await importedRuns()).toBe(3);
      const trials = await (await db()).trial.findMany({ where: { campaignId, run: { source: 'import' } }, include: { observations: true, run: true }, orderBy: { startedAt: 'asc' } });
      expect(trials).toHaveLength(3);
      expect(trials.map((t) => t.status)).toEqual(['done', 'failed', 'done']);
      expect(trials[1]!.failureReason).toBe('fell');
      expect(trials[0]!.observations[0]).toMatchObject({ name: 'apex_height', value: 182, origin: 'import' });
      expect(JSON.parse(trials[0]!.run.valuesJson)).toEqual({ payload: 0.5, gain: 1 });
    });

    it('stores every row of a valid file in one step', async () => {
      const res = await importTrials(campaignId, request(good), 'tester', NOW);
      expect(res.stored).toBe(3);
      expect(await importedRuns()).toBe(6);
      const runs = await listRuns(campaignId);
      expect(runs.filter((r) => r.source === 'import').every((r) => r.state === 'done' || r.state === 'failed')).toBe(true);
      expect((await getCampaign(campaignId)).responses).toHaveLength(4);
    });

    it('feeds the imported trials to the campaign data that fits and proposals use', async () => {
      const { rows } = await campaignData(campaignId);
      const imported = rows.filter((r) => r.apex_height === 182 && r.payload === 0.5 && r.gain === 1);
      expect(imported.length).toBeGreaterThanOrEqual(2);
    });
  });
});
