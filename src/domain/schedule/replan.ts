/**
 * Re-planning when the week does not go to plan: finished trials stay where they happened; failed
 * trials go back into the work (unless they are not to be repeated), skipped trials leave it, a rig
 * that goes down loses that time; the rest is planned again from `now` on.
 */
import { invalidInput } from '@/domain/errors';
import { parseInstant, subtractIntervals, type MsInterval } from './calendar';
import { groupedPlan } from './grouped';
import { assembleResult, type ResultFrame } from './plan';
import { prepare, type Prepared, type Unit } from './prepare';
import { emptyRigState, placementsOf, placeUnit, pushPlacement, type Placement, type RigState } from './rig-timeline';
import { sequentialFill } from './sequential';
import type { Assignment, ScheduleRequest, ScheduleResult, Unscheduled } from './types';

export type ScheduleEvent =
  /** The trial ran but failed; by default it is repeated (`repeat: false` drops it). */
  | { kind: 'trial_failed'; runId: string; repeat?: boolean }
  /** The trial will not be run in this campaign. */
  | { kind: 'trial_skipped'; runId: string }
  /** The rig is unavailable from `start` to `end` (to the end of the horizon when `end` is absent). */
  | { kind: 'rig_down'; rig: string; start: string; end?: string };

/**
 * Re-plan `request` around `fixed` (trials already done, kept as they happened) and `events`.
 * New work starts no earlier than `now` (ISO instant) when given, and on each rig after its last
 * fixed trial, continuing from that trial's levels (so a changeover is charged when they differ).
 * The rest of a whole plot that was started continues first on the same rig.
 */
export function replan(request: ScheduleRequest, fixed: readonly Assignment[], events: readonly ScheduleEvent[], now?: string): ScheduleResult {
  const nowMs = now === undefined ? -Infinity : parseInstant(now, 'now');
  const runIds = new Set(request.runs.map((r) => r.id));
  const rigNames = new Set(request.rigs.map((r) => r.name));

  const dropped = new Map<string, string>();
  const repeat = new Set<string>();
  const downtime = new Map<string, { start: number; end: number }[]>();
  events.forEach((e, i) => {
    if (e.kind === 'rig_down') {
      if (!rigNames.has(e.rig)) throw invalidInput(`events[${i}].rig`, `no rig is named "${e.rig}"`);
      const start = parseInstant(e.start, `events[${i}].start`);
      const end = e.end === undefined ? Infinity : parseInstant(e.end, `events[${i}].end`);
      downtime.set(e.rig, [...(downtime.get(e.rig) ?? []), { start, end }]);
      return;
    }
    if (!runIds.has(e.runId)) throw invalidInput(`events[${i}].runId`, `no run has the id "${e.runId}"`);
    if (e.kind === 'trial_skipped') dropped.set(e.runId, 'skipped: taken out of the plan');
    else if (e.repeat === false) dropped.set(e.runId, 'failed and not to be repeated');
    else repeat.add(e.runId);
  });

  const done = fixed.filter((a) => !repeat.has(a.runId));
  const doneIds = new Set<string>();
  done.forEach((a, i) => {
    if (!runIds.has(a.runId)) throw invalidInput(`fixed[${i}].runId`, `no run has the id "${a.runId}"`);
    if (!rigNames.has(a.rig)) throw invalidInput(`fixed[${i}].rig`, `no rig is named "${a.rig}"`);
    if (doneIds.has(a.runId)) throw invalidInput(`fixed[${i}].runId`, `run "${a.runId}" is listed as done twice`);
    doneIds.add(a.runId);
  });

  // New work only in time that is still ahead and not lost to downtime.
  const trimmed: ScheduleRequest = {
    ...request,
    rigs: request.rigs.map((rig) => {
      const cut = [...(downtime.get(rig.name) ?? []), { start: -Infinity, end: nowMs }];
      const intervals = rig.available.map((a, j) => ({
        start: parseInstant(a.start, `rigs.${rig.name}.available[${j}].start`),
        end: parseInstant(a.end, `rigs.${rig.name}.available[${j}].end`),
      }));
      const left = subtractIntervals(intervals, cut.map((c) => ({ start: c.start, end: Math.min(c.end, 8.64e15) })));
      return { ...rig, available: left.map((iv) => ({ start: new Date(iv.start).toISOString(), end: new Date(iv.end).toISOString() })) };
    }),
  };
  const p = prepare(trimmed);
  const original = prepare(request);
  const originalOrigin = original.originMs;
  const states = initialStates(p, done, nowMs, original.rigs.map((r) => r.intervals));
  const fixedPlacements = states.flatMap(placementsOf);
  const continued: Unit[] = [];

  const notes: string[] = [];
  const blocked: Unit[] = [];
  const remaining: Unit[] = [];
  const runRig = new Map(done.map((a) => [a.runId, p.rigs.findIndex((r) => r.name === a.rig)]));
  for (const unit of p.units) {
    const left = unit.runs.filter((r) => !doneIds.has(r.id) && !dropped.has(r.id));
    if (left.length === 0) continue;
    const started = unit.runs.filter((r) => doneIds.has(r.id));
    const rest: Unit = { ...unit, runs: left, workMs: left.reduce((s, r) => s + r.durationMs, 0) };
    if (started.length === 0) {
      remaining.push(rest);
      continue;
    }
    // The rest of a started whole plot continues on its rig, straight after the work fixed there.
    const rig = runRig.get(started[started.length - 1]!.id)!;
    rest.rigIndex = rig;
    continued.push(rest);
    const next = placeUnit(states[rig]!, rest, p);
    if (next) states[rig] = next;
    else blocked.push(rest);
    notes.push(`${unit.label} was started on ${p.rigs[rig]!.name}; its remaining ${left.length} run(s) continue there.`);
  }

  const plan = request.strategy === 'sequential' ? sequentialFill(p, remaining, states) : groupedPlan(p, remaining, states);
  const frame: ResultFrame = {
    originMs: Math.min(originalOrigin, ...fixedPlacements.map((x) => x.start)),
    boundUnits: [...continued, ...remaining],
    fixedChanges: fixedPlacements.reduce((s, x) => s + x.changes, 0),
    fixedEndMs: Math.max(-Infinity, ...fixedPlacements.map((x) => x.end)),
  };
  const result = assembleResult(p, { states: plan.states, unplaced: [...blocked, ...plan.unplaced], notes: [...notes, ...plan.notes] }, frame);
  const skipped: Unscheduled[] = [...dropped].map(([runId, reason]) => ({ runId, reason }));
  result.unscheduled = [...result.unscheduled, ...skipped];
  return result;
}

/** Rig timelines holding the fixed trials, ready to take new work after them. */
function initialStates(p: Prepared, done: readonly Assignment[], nowMs: number, hours: readonly (readonly MsInterval[])[]): RigState[] {
  const byId = new Map(p.runs.map((r) => [r.id, r]));
  return p.rigs.map((rig) => {
    const state = emptyRigState(rig);
    const mine = done.filter((a) => a.rig === rig.name).map((a, i) => ({ a, start: parseInstant(a.start, `fixed.${a.runId}.start`), end: parseInstant(a.end, `fixed.${a.runId}.end`), i }));
    mine.sort((x, y) => x.start - y.start || x.i - y.i);
    for (const { a, start, end } of mine) {
      const run = byId.get(a.runId)!;
      let changes = 0;
      let changeMs = 0;
      const changed: number[] = [];
      p.changeoverFactors.forEach((f, k) => {
        if (state.lastLevels[k] !== undefined && state.lastLevels[k] !== run.levels[k]) {
          changed.push(k);
          changeMs += f.ms;
          if (f.ms > 0) changes++;
        }
      });
      // Show the changeover that must have happened between the trials: just before this one, or else
      // just after the previous one, wherever the rig's hours held it.
      const activities: Placement['activities'] = [];
      if (changeMs > 0) {
        const within = (a: number, b: number) => a >= state.lastEnd && b <= start && hours[rig.index]!.some((iv) => a >= iv.start && b <= iv.end);
        const at = within(start - changeMs, start) ? start - changeMs : within(state.lastEnd, state.lastEnd + changeMs) ? state.lastEnd : undefined;
        if (at !== undefined) activities.push({ kind: 'changeover', start: at, end: at + changeMs, factors: changed });
      }
      const placement: Placement = { run, rig: rig.index, start, end, activities, changes, previousLevels: state.lastLevels.slice() };
      pushPlacement(state, placement);
      state.lastEnd = Math.max(state.lastEnd, end);
      state.lastLevels = run.levels.slice();
      state.trialsSinceUpkeep++;
      state.msSinceUpkeep += run.durationMs;
      if (p.upkeep && state.trialsSinceUpkeep >= p.upkeep.everyTrials) {
        // Assume the upkeep due was done on time.
        state.trialsSinceUpkeep = 0;
        state.msSinceUpkeep = 0;
      }
    }
    state.cursor = Math.max(state.lastEnd, nowMs);
    return state;
  });
}
