/**
 * The stored week plan on a real database: a split-plot design placed on two rigs, a whole plot whose
 * runs are re-sorted is refused with the field and nothing is stored, the same plot moved as it is is
 * stored with an audit event, and the rig's iCalendar file lists every placed run.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import { rigCalendar } from '@/domain/schedule';
import { campaignCreateSchema } from '@/server/api/schemas/campaign';
import { closeDb, db } from '@/server/db/client';
import { createCampaign } from '@/server/repos/campaigns';
import { commitDesign, listRuns } from '@/server/repos/runs';
import { placeRuns } from '@/server/repos/schedule';
import { loadPlan, moveWholePlot } from '@/server/repos/week-plan';
import { freshDatabase } from './database';

describe('week plan and whole-plot moves on a real database', () => {
  let campaignId = '';

  beforeAll(async () => {
    await freshDatabase();
    const input = campaignCreateSchema.parse({
      name: 'Week plan check',
      trialMinutes: 20,
      factors: [
        { name: 'surface', kind: 'categorical', levels: ['turf', 'glass'], hardToChange: true, changeMinutes: 40 },
        { name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 1.8 },
        { name: 'gain', kind: 'continuous', low: 0.5, high: 2 },
      ],
      responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
      rigs: [
        { name: 'Bench 1', timeZone: 'Europe/Berlin', startTime: '09:00', endTime: '17:00' },
        { name: 'Bench 2', timeZone: 'Europe/Berlin', startTime: '09:00', endTime: '17:00' },
      ],
    });
    campaignId = (await createCampaign(input, 'test')).id;
    await commitDesign(campaignId, { method: 'optimal', model: 'main-effects', runs: 12, wholePlots: 4, seed: 3 }, 'test');
    // 2026-03-02 is a Monday.
    const placed = await placeRuns(campaignId, '2026-03-02', 5, 'test');
    expect(placed.assignments).toHaveLength(12);
  });
  afterAll(async () => {
    await closeDb();
  });

  it('reads the plan with whole plots and changeovers', async () => {
    const plan = await loadPlan(campaignId, { today: '2026-03-02' });
    expect(plan.from).toBe('2026-03-02');
    expect(plan.result.assignments).toHaveLength(12);
    expect(new Set(plan.request.runs.map((r) => r.wholePlot)).size).toBe(4);
    for (const a of plan.result.activities) expect(a.changes![0]!.factor).toBe('surface');
  });

  it('refuses runs re-sorted inside a whole plot, naming runOrder, and stores nothing', async () => {
    const plan = await loadPlan(campaignId);
    const plot = plan.request.runs[0]!.wholePlot!;
    const design = plan.request.runs.filter((r) => r.wholePlot === plot).map((r) => r.id);
    const client = await db();
    const before = await client.slot.findMany({ orderBy: { id: 'asc' } });
    const events = await client.auditEvent.count();
    const err = await moveWholePlot(campaignId, { wholePlot: plot, rig: 'Bench 2', day: '2026-03-04', time: '09:00', runOrder: [...design].reverse() }).catch((e) => e);
    expect(err).toBeInstanceOf(DomainError);
    expect(err.field).toBe('runOrder');
    expect(err.message).toMatch(/split-plot/);
    expect(await client.slot.findMany({ orderBy: { id: 'asc' } })).toEqual(before);
    expect(await client.auditEvent.count()).toBe(events);
  });

  it('moves the plot as it is to another rig and day, stores the slots and audits the move', async () => {
    const plan = await loadPlan(campaignId);
    const plot = plan.request.runs[0]!.wholePlot!;
    const design = plan.request.runs.filter((r) => r.wholePlot === plot).map((r) => r.id);
    const { moved } = await moveWholePlot(campaignId, { wholePlot: plot, rig: 'Bench 2', day: '2026-03-04', time: '09:00', runOrder: design }, 'test');
    expect(moved.map((m) => m.runId)).toEqual(design);
    // 09:00 in Berlin in March is 08:00 UTC; a surface different from Bench 2's last trial adds its 40-min change first.
    const last = plan.result.assignments.filter((a) => a.rig === 'Bench 2' && !design.includes(a.runId)).at(-1)!;
    const surfaceOf = (id: string) => plan.request.runs.find((r) => r.id === id)!.values.surface;
    const change = surfaceOf(last.runId) !== surfaceOf(design[0]!);
    expect(moved[0]!.start).toBe(change ? '2026-03-04T08:40:00.000Z' : '2026-03-04T08:00:00.000Z');
    const runs = await listRuns(campaignId);
    for (const m of moved) {
      const run = runs.find((r) => String(r.runNumber) === m.runId)!;
      expect(run.slot).toMatchObject({ rigName: 'Bench 2', start: m.start, end: m.end });
    }
    const client = await db();
    expect(await client.auditEvent.count({ where: { action: 'schedule-move', entityId: campaignId } })).toBe(1);

    const after = await loadPlan(campaignId);
    const ics = rigCalendar(after.request, after.result, 'Bench 2', { includeActivities: false });
    expect(ics.startsWith('BEGIN:VCALENDAR')).toBe(true);
    expect(ics.match(/BEGIN:VEVENT/g)).toHaveLength(after.result.assignments.filter((a) => a.rig === 'Bench 2').length);
  });
});
