/**
 * planSchedule: a campaign's runs onto rigs and times. This file holds the sequential fill and the
 * assembly of the answer (assignments, activities, counts, bounds, what did not fit and why).
 */
import { changeoverLowerBound, makespanLowerBound, minimumRigTimeMs } from './bounds';
import { MINUTE, prepare, type Prepared, type Unit } from './prepare';
import { groupedPlan } from './grouped';
import { placementsOf } from './rig-timeline';
import { sequentialFill, type RigPlan } from './sequential';
import type { Assignment, Infeasibility, LevelValue, RigActivity, ScheduleRequest, ScheduleResult, Unscheduled } from './types';

function minutes(ms: number): number {
  return Math.round((ms / MINUTE) * 1000) / 1000;
}

function hours(ms: number): string {
  return `${(ms / 3_600_000).toFixed(1)} h`;
}

/** Say which constraint keeps each unplaced unit out, and by how much. */
export function explainUnplaced(p: Prepared, plan: RigPlan): { unscheduled: Unscheduled[]; infeasibility: Infeasibility[] } {
  const unscheduled: Unscheduled[] = [];
  const infeasibility: Infeasibility[] = [];
  if (plan.unplaced.length === 0) return { unscheduled, infeasibility };

  const { trialMs, setupMs } = minimumRigTimeMs(p, p.units);
  const required = trialMs + setupMs;
  const available = p.rigs.reduce((s, r) => s + r.capacityMs, 0);
  if (required > available) {
    const setupNote = setupMs > 0 ? ` (${hours(trialMs)} of trials and at least ${hours(setupMs)} of changeovers and upkeep)` : '';
    infeasibility.push({
      constraint: 'rig_hours',
      message: `the runs need at least ${hours(required)} of rig time${setupNote} but the rigs offer ${hours(available)}: short by ${hours(required - available)}`,
      requiredMinutes: minutes(required),
      availableMinutes: minutes(available),
      shortByMinutes: minutes(required - available),
    });
  }
  const longestInterval = Math.max(0, ...p.rigs.flatMap((r) => r.intervals.map((i) => i.end - i.start)));
  const usedByRig = plan.states.map((s) => placementsOf(s).reduce((a, x) => a + (x.end - x.start), 0));
  const freeMs = p.rigs.reduce((s, r, i) => s + r.capacityMs - usedByRig[i]!, 0);
  const unplacedMs = plan.unplaced.reduce((s, u) => s + u.workMs, 0);
  let reportedFragmentation = false;
  for (const unit of plan.unplaced) {
    const longestRun = Math.max(...unit.runs.map((r) => r.durationMs));
    let reason: string;
    if (longestRun > longestInterval) {
      reason = `a trial of ${minutes(longestRun)} min needs one unbroken stretch, but the longest available interval is ${minutes(longestInterval)} min`;
      infeasibility.push({
        constraint: 'interval_length',
        message: `${unit.label}: ${reason}`,
        requiredMinutes: minutes(longestRun),
        availableMinutes: minutes(longestInterval),
        shortByMinutes: minutes(longestRun - longestInterval),
      });
    } else if (unit.window) {
      reason = `block ${unit.window.block} is pinned to ${unit.window.day} and its ${minutes(unit.workMs)} min no longer fit on any rig that day`;
      infeasibility.push({ constraint: 'block_day', message: `${unit.label}: ${reason}`, requiredMinutes: minutes(unit.workMs) });
    } else if (required > available) {
      reason = `not enough rig time: the work exceeds the rigs' hours by ${hours(required - available)}`;
    } else {
      reason = `no rig has ${minutes(unit.workMs)} min left after the work already placed (with changeovers and upkeep)`;
      if (!reportedFragmentation) {
        reportedFragmentation = true;
        infeasibility.push({
          constraint: 'fragmentation',
          message: `${minutes(unplacedMs)} min of work did not fit: ${minutes(freeMs)} min of rig time is left but split into pieces too short or taken by changeovers, upkeep and cool-down`,
          requiredMinutes: minutes(unplacedMs),
          availableMinutes: minutes(freeMs),
          shortByMinutes: minutes(Math.max(0, unplacedMs - freeMs)),
        });
      }
    }
    for (const r of unit.runs) unscheduled.push({ runId: r.id, reason: `${unit.label}: ${reason}` });
  }
  return { unscheduled, infeasibility };
}

function levelOf(p: Prepared, runIndex: number, factor: string): LevelValue {
  return p.runs[runIndex]!.run.values[factor]!;
}

/** How a re-plan measures: from the week's origin, with bounds over the work still to place. */
export interface ResultFrame {
  originMs: number;
  /** Units still to be placed (the bounds refer to these, on top of the fixed work). */
  boundUnits: Unit[];
  fixedChanges: number;
  fixedEndMs: number;
}

/** Turn rig timelines into the public answer. */
export function assembleResult(p: Prepared, plan: RigPlan, frame?: ResultFrame): ScheduleResult {
  const perRig = plan.states.map(placementsOf);
  const placements = perRig.flat();
  placements.sort((a, b) => a.start - b.start || a.rig - b.rig);
  const iso = (ms: number) => new Date(ms).toISOString();
  const assignments: Assignment[] = placements.map((x) => {
    const a: Assignment = { runId: x.run.id, rig: p.rigs[x.rig]!.name, start: iso(x.start), end: iso(x.end) };
    const operator = p.operators.find((o) => o.rig === x.rig && o.hours.some((h) => h.start <= x.start && h.end >= x.end));
    if (operator) a.operator = operator.name;
    return a;
  });

  // Previous run on the same rig, to report changeover levels "from → to".
  const previousOnRig = new Map<string, number>();
  for (const list of perRig) list.forEach((x, i) => i > 0 && previousOnRig.set(x.run.id, list[i - 1]!.run.index));

  const activities: RigActivity[] = [];
  let changeovers = 0;
  let changeoverMs = 0;
  for (const x of placements) {
    changeovers += x.changes;
    for (const a of x.activities) {
      const activity: RigActivity = { rig: p.rigs[x.rig]!.name, kind: a.kind, start: iso(a.start), end: iso(a.end), beforeRunId: x.run.id };
      if (a.kind === 'changeover') {
        changeoverMs += a.end - a.start;
        const prev = previousOnRig.get(x.run.id)!;
        activity.changes = (a.factors ?? []).map((k) => {
          const name = p.changeoverFactors[k]!.name;
          return { factor: name, from: levelOf(p, prev, name), to: levelOf(p, x.run.index, name) };
        });
      }
      activities.push(activity);
    }
  }
  const lastEnd = placements.reduce((m, x) => Math.max(m, x.end), -Infinity);
  const originMs = frame ? Math.min(frame.originMs, p.originMs) : p.originMs;
  const makespanMinutes = placements.length ? minutes(lastEnd - originMs) : 0;

  // Bounds refer to the runs that were scheduled.
  const placedKeys = new Set(placements.map((x) => x.run.id));
  const boundUnits = (frame ? frame.boundUnits : p.units).filter((u) => u.runs.every((r) => placedKeys.has(r.id)));
  const lowerBound = frame
    ? {
        changeovers: frame.fixedChanges + changeoverLowerBound(p, boundUnits),
        makespanMinutes: minutes(
          Math.max(
            frame.fixedEndMs - originMs,
            boundUnits.length ? p.originMs - originMs + makespanLowerBound(p, boundUnits) * MINUTE : 0,
          ),
        ),
      }
    : {
        changeovers: changeoverLowerBound(p, boundUnits),
        makespanMinutes: minutes(makespanLowerBound(p, boundUnits) * MINUTE),
      };
  const { unscheduled, infeasibility } = explainUnplaced(p, plan);
  const result: ScheduleResult = {
    assignments,
    activities,
    changeovers,
    changeoverMinutesTotal: minutes(changeoverMs),
    makespanMinutes,
    lowerBound,
    gap: {
      changeovers: changeovers - lowerBound.changeovers,
      makespanMinutes: minutes((makespanMinutes - lowerBound.makespanMinutes) * MINUTE),
    },
    unscheduled,
    notes: plan.notes,
  };
  if (infeasibility.length) result.infeasibility = infeasibility;
  return result;
}

/** Place a campaign's runs onto rigs. Pure: the same request gives the same schedule. */
export function planSchedule(request: ScheduleRequest): ScheduleResult {
  const p = prepare(request);
  // Blocks pinned to days go in calendar order; otherwise the design's order.
  const inDayOrder = p.units.slice().sort((a, b) => (a.window?.start ?? Infinity) - (b.window?.start ?? Infinity) || a.firstIndex - b.firstIndex);
  const plan = request.strategy === 'sequential' ? sequentialFill(p, p.units.some((u) => u.window) ? inDayOrder : p.units) : groupedPlan(p);
  if (request.strategy !== 'sequential' && p.changeoverFactors.some((f) => f.ms > 0) && p.units.length > 1) {
    plan.notes.push(
      'Whole plots were grouped by their levels of the hard-to-change factors to save changeovers; the runs inside every whole plot keep the design’s order.',
    );
  }
  return assembleResult(p, plan);
}
