/**
 * Turning a request into the solver's working form: runs with millisecond durations and level keys
 * of the hard-to-change factors, whole-plot units in design order, rigs with merged intervals.
 */
import { invalidInput } from '@/domain/errors';
import { intersectIntervals, mergeIntervals, parseInstant, type MsInterval } from './calendar';
import { addCalendarDays, assertTimeZone, parseDay, wallTimeToUtc } from './time-zone';
import type { LevelValue, ScheduleRequest, ScheduleRun } from './types';

export const MINUTE = 60_000;

export interface PreparedRun {
  /** Position in the request (the design's run order). */
  index: number;
  id: string;
  run: ScheduleRun;
  durationMs: number;
  /** Level key per changeover factor (same order as `Prepared.changeoverFactors`). */
  levels: string[];
}

export interface Unit {
  /** Whole-plot label, or the run id for a run outside any whole plot. */
  key: string;
  label: string;
  /** Runs in the design's order; never reordered. */
  runs: PreparedRun[];
  /** Position of the unit's first run in the request. */
  firstIndex: number;
  workMs: number;
  /** Calendar window the unit must lie in (block pinned to a day), or none. */
  window?: MsInterval & { day: string; block: string };
  /** Rig the unit must use (the rest of a whole plot already started there, when re-planning). */
  rigIndex?: number;
}

export interface ChangeoverFactor {
  name: string;
  ms: number;
}

export interface PreparedRig {
  name: string;
  index: number;
  intervals: MsInterval[];
  capacityMs: number;
}

export interface Prepared {
  runs: PreparedRun[];
  units: Unit[];
  rigs: PreparedRig[];
  /** Factors with a changeover time, in the order of `changeoverMinutes`. */
  changeoverFactors: ChangeoverFactor[];
  upkeep?: { everyTrials: number; everyMs: number; ms: number; cooldownMs: number };
  cooldownMs: number;
  /** Earliest available instant over all rigs (the makespan's origin). */
  originMs: number;
  timeZone: string;
  /** Operators with their rig (index) and hours, in request order. */
  operators: { name: string; rig: number; hours: MsInterval[] }[];
}

export function levelKey(v: LevelValue | undefined): string {
  return v === undefined ? '\u0000missing' : `${typeof v}:${String(v)}`;
}

function nonNegative(value: number | undefined, field: string): number {
  if (value === undefined) return 0;
  if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
    throw invalidInput(field, 'must be a finite number of minutes, zero or more');
  }
  return value;
}

export function prepare(request: ScheduleRequest): Prepared {
  const timeZone = request.timeZone ?? 'UTC';
  assertTimeZone(timeZone);
  const changeoverFactors: ChangeoverFactor[] = Object.entries(request.changeoverMinutes ?? {}).map(([name, minutes]) => ({
    name,
    ms: nonNegative(minutes, `changeoverMinutes.${name}`) * MINUTE,
  }));

  const seen = new Set<string>();
  const runs: PreparedRun[] = request.runs.map((run, index) => {
    if (typeof run.id !== 'string' || run.id === '') throw invalidInput(`runs[${index}].id`, 'every run needs a non-empty id');
    if (seen.has(run.id)) throw invalidInput(`runs[${index}].id`, `run id "${run.id}" appears twice; ids must be unique`);
    seen.add(run.id);
    const minutes = run.durationMinutes ?? request.defaultDurationMinutes;
    if (minutes === undefined || !Number.isFinite(minutes) || minutes <= 0) {
      throw invalidInput(`runs[${index}].durationMinutes`, 'give each run a duration above zero minutes (or a defaultDurationMinutes)');
    }
    return {
      index,
      id: run.id,
      run,
      durationMs: minutes * MINUTE,
      levels: changeoverFactors.map((f) => levelKey(run.values?.[f.name])),
    };
  });

  // Whole plots keep their runs in the design's order; a run without one is its own unit.
  const byKey = new Map<string, Unit>();
  const units: Unit[] = [];
  for (const r of runs) {
    const key = r.run.wholePlot === undefined ? `run:${r.id}` : `wp:${String(r.run.wholePlot)}`;
    let unit = byKey.get(key);
    if (!unit) {
      unit = {
        key,
        label: r.run.wholePlot === undefined ? `run ${r.id}` : `whole plot ${String(r.run.wholePlot)}`,
        runs: [],
        firstIndex: r.index,
        workMs: 0,
      };
      byKey.set(key, unit);
      units.push(unit);
    }
    unit.runs.push(r);
    unit.workMs += r.durationMs;
  }

  if (request.blockDays) {
    const windows = new Map<string, MsInterval & { day: string }>();
    for (const [block, day] of Object.entries(request.blockDays)) {
      parseDay(day, `blockDays.${block}`);
      windows.set(block, {
        day,
        start: wallTimeToUtc(day, '00:00', timeZone),
        end: wallTimeToUtc(addCalendarDays(day, 1), '00:00', timeZone),
      });
    }
    for (const unit of units) {
      const blocks = new Set(unit.runs.filter((r) => r.run.block !== undefined).map((r) => String(r.run.block)));
      if (blocks.size > 1) {
        throw invalidInput('runs', `${unit.label} spans blocks ${[...blocks].join(', ')}; a whole plot must sit inside one block`);
      }
      const block = [...blocks][0];
      const w = block === undefined ? undefined : windows.get(block);
      if (w && block !== undefined) unit.window = { ...w, block };
    }
  }

  // Staffing: the union of each rig's operators' hours.
  const operatorHours = new Map<string, MsInterval[]>();
  const knownRigs = new Set(request.rigs.map((r) => r.name));
  (request.operators ?? []).forEach((op, i) => {
    if (!knownRigs.has(op.rig)) throw invalidInput(`operators[${i}].rig`, `no rig is named "${op.rig}"`);
    const hours = op.available.map((a, j) => ({
      start: parseInstant(a.start, `operators[${i}].available[${j}].start`),
      end: parseInstant(a.end, `operators[${i}].available[${j}].end`),
    }));
    operatorHours.set(op.rig, mergeIntervals([...(operatorHours.get(op.rig) ?? []), ...hours]));
  });

  const rigNames = new Set<string>();
  const rigs: PreparedRig[] = request.rigs.map((rig, index) => {
    if (typeof rig.name !== 'string' || rig.name === '') throw invalidInput(`rigs[${index}].name`, 'every rig needs a name');
    if (rigNames.has(rig.name)) throw invalidInput(`rigs[${index}].name`, `rig name "${rig.name}" appears twice`);
    rigNames.add(rig.name);
    const raw = rig.available.map((a, j) => {
      const start = parseInstant(a.start, `rigs[${index}].available[${j}].start`);
      const end = parseInstant(a.end, `rigs[${index}].available[${j}].end`);
      if (end <= start) throw invalidInput(`rigs[${index}].available[${j}].end`, 'an interval must end after it starts');
      return { start, end };
    });
    const staff = operatorHours.get(rig.name);
    const intervals = staff ? intersectIntervals(mergeIntervals(raw), staff) : mergeIntervals(raw);
    return { name: rig.name, index, intervals, capacityMs: intervals.reduce((s, i) => s + i.end - i.start, 0) };
  });
  if (rigs.length === 0) throw invalidInput('rigs', 'name at least one rig with available time');

  let upkeep: Prepared['upkeep'];
  const cooldownMs = nonNegative(request.upkeep?.cooldownMinutes, 'upkeep.cooldownMinutes') * MINUTE;
  if (request.upkeep) {
    const u = request.upkeep;
    const everyTrials = u.everyTrials ?? Infinity;
    const everyMs = (u.everyMinutes ?? Infinity) * MINUTE;
    if (u.everyTrials !== undefined && (!Number.isInteger(u.everyTrials) || u.everyTrials < 1)) {
      throw invalidInput('upkeep.everyTrials', 'must be a whole number of trials, 1 or more');
    }
    if (u.everyMinutes !== undefined && (!Number.isFinite(u.everyMinutes) || u.everyMinutes <= 0)) {
      throw invalidInput('upkeep.everyMinutes', 'must be a number of minutes above zero');
    }
    upkeep = { everyTrials, everyMs, ms: nonNegative(u.minutes, 'upkeep.minutes') * MINUTE, cooldownMs };
  }

  const starts = rigs.flatMap((r) => (r.intervals.length ? [r.intervals[0]!.start] : []));
  const originMs = starts.length ? Math.min(...starts) : 0;
  const operators = (request.operators ?? []).map((op) => ({
    name: op.name,
    rig: rigs.findIndex((r) => r.name === op.rig),
    hours: mergeIntervals(op.available.map((a) => ({ start: Date.parse(a.start), end: Date.parse(a.end) }))),
  }));
  return { runs, units, rigs, changeoverFactors, upkeep, cooldownMs, originMs, timeZone, operators };
}
