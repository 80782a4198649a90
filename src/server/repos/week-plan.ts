/** The stored week plan of a campaign (slots plus derived changeovers) and manual moves of whole plots. */
import { wallTimeToUtc, type ManualMove } from '@/domain/schedule';
import { DomainError } from '@/domain/errors';
import { checkMove, planView, type PlanView } from '@/server/plan/week-plan';
import { db } from '@/server/db/client';
import { audit } from './audit';
import { getCampaign, type CampaignView } from './campaigns';
import { listRuns } from './runs';

export interface LoadedPlan extends PlanView {
  campaign: CampaignView;
}

/** Read the campaign's plan; `from`/`days` choose the calendar span of the rigs' hours. */
export async function loadPlan(campaignId: string, options: { from?: string; days?: number; today?: string } = {}): Promise<LoadedPlan> {
  const campaign = await getCampaign(campaignId);
  const runs = await listRuns(campaignId);
  const view = planView({
    rigs: campaign.rigs,
    runs: runs.map((r) => ({
      id: r.id,
      runNumber: r.runNumber,
      values: r.values,
      wholePlot: r.wholePlot,
      block: r.block,
      state: r.state,
      slot: r.slot ? { rigId: r.slot.rigId, start: r.slot.start, end: r.slot.end } : null,
    })),
    changeoverMinutes: Object.fromEntries(campaign.factors.filter((f) => f.hardToChange).map((f) => [f.name, f.changeMinutes])),
    trialMinutes: campaign.trialMinutes,
    from: options.from,
    days: options.days,
    today: options.today ?? new Date().toISOString().slice(0, 10),
  });
  return { ...view, campaign };
}

/** The rig of a campaign by id or by name; a 404-style error naming `rig` otherwise. */
export function rigOf(plan: LoadedPlan, rig: string | null): CampaignView['rigs'][number] {
  if (!rig) throw new DomainError('invalid_input', 'name the rig (rig=<rig id>)', 'rig');
  const found = plan.campaign.rigs.find((r) => r.id === rig || r.name === rig);
  if (!found) throw new DomainError('not_found', `this campaign has no rig "${rig}"`, 'rig');
  return found;
}

export interface MoveInput {
  wholePlot?: string | number;
  runId?: string;
  rig: string;
  start?: string;
  day?: string;
  time?: string;
  runOrder?: string[];
}

/**
 * Move a whole plot (or a lone run) to another rig or time after the schedule engine accepts it; the
 * moved slots are rewritten and the move is audited. A refused move changes nothing.
 */
export async function moveWholePlot(campaignId: string, input: MoveInput, actor = 'local') {
  const plan = await loadPlan(campaignId);
  const rig = rigOf(plan, input.rig);
  const start = input.start ?? new Date(wallTimeToUtc(input.day!, input.time!, rig.timeZone)).toISOString();
  const move: ManualMove = { rig: rig.name, start, ...(input.wholePlot !== undefined ? { wholePlot: input.wholePlot } : {}), ...(input.runId !== undefined ? { runId: input.runId } : {}), ...(input.runOrder ? { runOrder: input.runOrder } : {}) };
  const check = checkMove(plan, move);
  const before = check.moved.map((m) => plan.result.assignments.find((a) => a.runId === m.runId)!);
  const client = await db();
  await client.$transaction(async (tx) => {
    for (const m of check.moved) {
      const run = plan.runsById.get(m.runId)!;
      const slot = await tx.slot.findFirst({ where: { runId: run.id }, orderBy: { scheduleVersion: 'desc' } });
      if (!slot) throw new DomainError('conflict', `run ${m.runId} lost its slot meanwhile; reload the plan`, 'wholePlot');
      await tx.slot.update({ where: { id: slot.id }, data: { rigId: rig.id, start: new Date(m.start), end: new Date(m.end) } });
    }
    await audit(tx, actor, 'schedule-move', 'campaign', campaignId, { slots: before }, { slots: check.moved, wholePlot: input.wholePlot ?? null });
  });
  return { moved: check.moved };
}
