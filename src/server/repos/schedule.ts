/** Placing a campaign's open runs on its rigs' working hours, and reading the plan back. */
import { DomainError } from '@/domain/errors';
import { planSchedule, workingAvailability, type ScheduleResult } from '@/domain/schedule';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { getCampaign } from './campaigns';
import { listRuns } from './runs';

export async function placeRuns(campaignId: string, startDate: string, days: number, actor = 'local'): Promise<ScheduleResult> {
  const campaign = await getCampaign(campaignId);
  if (campaign.rigs.length === 0) throw new DomainError('invalid_input', 'this campaign has no rig; add a rig before placing runs', 'rigs');
  const open = (await listRuns(campaignId)).filter((r) => r.state === 'planned' || r.state === 'scheduled');
  if (open.length === 0) throw new DomainError('invalid_input', 'every run has already been tried; generate a design or add runs first', 'runs');
  const rigs = campaign.rigs.map((r) => ({
    name: r.name,
    available: workingAvailability({ workdays: r.workdays, startTime: r.startTime, endTime: r.endTime, timeZone: r.timeZone }, startDate, days),
  }));
  const changeoverMinutes = Object.fromEntries(campaign.factors.filter((f) => f.hardToChange).map((f) => [f.name, f.changeMinutes]));
  const result = planSchedule({
    runs: open.map((r) => ({ id: r.id, values: r.values, wholePlot: r.wholePlot ?? undefined, block: r.block ?? undefined })),
    rigs,
    changeoverMinutes,
    defaultDurationMinutes: campaign.trialMinutes,
    timeZone: campaign.rigs[0]!.timeZone,
  });
  const rigIds = new Map(campaign.rigs.map((r) => [r.name, r.id]));
  const client = await db();
  await client.$transaction(async (tx) => {
    const prev = await tx.slot.aggregate({ where: { run: { campaignId } }, _max: { scheduleVersion: true } });
    const version = (prev._max.scheduleVersion ?? 0) + 1;
    await tx.slot.deleteMany({ where: { runId: { in: open.map((r) => r.id) } } });
    let sequence = 0;
    for (const a of result.assignments) {
      await tx.slot.create({
        data: { runId: a.runId, rigId: rigIds.get(a.rig)!, start: new Date(a.start), end: new Date(a.end), sequence: sequence++, scheduleVersion: version },
      });
    }
    await audit(tx, actor, 'schedule', 'campaign', campaignId, null, {
      version,
      startDate,
      days,
      placed: result.assignments.length,
      unscheduled: result.unscheduled.length,
      changeovers: result.changeovers,
    });
  });
  return result;
}

export interface SlotView {
  slotId: string;
  runId: string;
  runNumber: number;
  values: Record<string, number | string>;
  rigId: string;
  rigName: string;
  start: string;
  end: string;
  state: string;
}

export async function listSlots(campaignId: string, rigId?: string): Promise<SlotView[]> {
  const runs = await listRuns(campaignId);
  return runs
    .filter((r) => r.slot && (!rigId || r.slot.rigId === rigId))
    .map((r) => ({
      slotId: `${r.id}@${r.slot!.start}`,
      runId: r.id,
      runNumber: r.runNumber,
      values: r.values,
      rigId: r.slot!.rigId,
      rigName: r.slot!.rigName,
      start: r.slot!.start,
      end: r.slot!.end,
      state: r.state,
    }))
    .sort((a, b) => a.start.localeCompare(b.start));
}
