/** Route handlers of the week plan: grid, day sheet, per-rig iCalendar file, manual moves. */
import { daySheet, rigCalendar, weekGrid } from '@/domain/schedule';
import { scopeCalendarUids } from '@/server/plan/calendar-scope';
import { daySheetQuerySchema, planMoveSchema, planSpanSchema } from '@/server/api/schemas/plan';
import { loadPlan, moveWholePlot, rigOf } from '@/server/repos/week-plan';
import { readJson, type Caller } from './http';
import { parseWith } from './validation';

const query = (req: Request) => Object.fromEntries(new URL(req.url).searchParams.entries());

/** GET .../schedule/week?from=yyyy-MM-dd&days=7: one cell per day and rig with trials, changeovers, upkeep. */
export const weekGridHandler = async (req: Request, p: Record<string, string>) => {
  const span = parseWith(planSpanSchema, query(req));
  const plan = await loadPlan(p.id!, { from: span.from });
  return { grid: weekGrid(plan.request, plan.result, span.from ?? plan.from, span.days ?? 7), changeovers: plan.result.changeovers, unscheduled: plan.result.unscheduled };
};

/** GET .../schedule/day-sheet?rig=<rig id>&day=yyyy-MM-dd */
export const daySheetHandler = async (req: Request, p: Record<string, string>) => {
  const q = parseWith(daySheetQuerySchema, query(req));
  const plan = await loadPlan(p.id!);
  const rig = rigOf(plan, q.rig);
  return daySheet(plan.request, plan.result, rig.name, q.day, rig.timeZone);
};

/** GET .../schedule/calendar?rig=<rig id>[&activities=0]: text/calendar (RFC 5545) as a download. */
export const rigCalendarHandler = async (req: Request, p: Record<string, string>) => {
  const q = query(req);
  const plan = await loadPlan(p.id!);
  const rig = rigOf(plan, q.rig ?? null);
  // UIDs scoped to the campaign: two campaigns on the same rig both have a "run 12".
  const text = scopeCalendarUids(rigCalendar(plan.request, plan.result, rig.name, { includeActivities: q.activities !== '0', name: `${plan.campaign.name} – ${rig.name}` }), plan.campaign.id);
  const file = `${rig.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'rig'}.ics`;
  return new Response(text, {
    status: 200,
    headers: { 'content-type': 'text/calendar; charset=utf-8', 'content-disposition': `attachment; filename="${file}"`, 'cache-control': 'no-store' },
  });
};

/** POST .../schedule/move: the schedule engine checks the move first; a refused move answers 4xx naming the field. */
export const moveHandler = async (req: Request, p: Record<string, string>, c: Caller) => {
  const input = parseWith(planMoveSchema, await readJson(req));
  return moveWholePlot(p.id!, input, c.actor);
};
