/**
 * What the pages and the export need from a schedule: a rig's hours on one day, the week grid, a
 * printable day sheet per rig, and an iCalendar (RFC 5545) file per rig.
 */
import ical from 'ical-generator';
import { invalidInput } from '@/domain/errors';
import { parseInstant } from './calendar';
import { addCalendarDays, assertTimeZone, clockInZone, parseDay, wallTimeToUtc } from './time-zone';
import type { LevelValue, ScheduleRequest, ScheduleResult, ScheduleRig, TimeInterval } from './types';

/** A rig's available time on one local calendar day, clipped to that day. */
export function dayAvailability(rig: ScheduleRig, day: string, timeZone = 'UTC'): TimeInterval[] {
  assertTimeZone(timeZone);
  parseDay(day, 'day');
  const from = wallTimeToUtc(day, '00:00', timeZone);
  const to = wallTimeToUtc(addCalendarDays(day, 1), '00:00', timeZone);
  const out: TimeInterval[] = [];
  rig.available.forEach((a, i) => {
    const s = Math.max(from, parseInstant(a.start, `available[${i}].start`));
    const e = Math.min(to, parseInstant(a.end, `available[${i}].end`));
    if (e > s) out.push({ start: new Date(s).toISOString(), end: new Date(e).toISOString() });
  });
  return out.sort((x, y) => Date.parse(x.start) - Date.parse(y.start));
}

export interface SheetRow {
  kind: 'trial' | 'changeover' | 'upkeep';
  start: string;
  end: string;
  /** Local clock times in the sheet's zone (HH:mm). */
  startLocal: string;
  endLocal: string;
  minutes: number;
  runId: string;
  wholePlot?: string | number;
  block?: string | number;
  /** Factor settings for a trial; for a changeover the levels being changed. */
  values?: Record<string, LevelValue>;
  label: string;
}

export interface DaySheet {
  rig: string;
  day: string;
  timeZone: string;
  available: TimeInterval[];
  rows: SheetRow[];
  totals: { trials: number; trialMinutes: number; changeovers: number; changeoverMinutes: number; upkeeps: number; upkeepMinutes: number };
}

function valuesText(values: Record<string, LevelValue>): string {
  return Object.entries(values)
    .map(([k, v]) => `${k} ${String(v)}`)
    .join(', ');
}

/** Rows (trials, changeovers, upkeep) of one rig that start on one local day, in time order. */
function rigRows(request: ScheduleRequest, result: ScheduleResult, rig: string, timeZone: string, from: number, to: number): SheetRow[] {
  const runs = new Map(request.runs.map((r) => [r.id, r]));
  const minutes = (s: string, e: string) => (Date.parse(e) - Date.parse(s)) / 60_000;
  const rows: SheetRow[] = [];
  for (const a of result.assignments) {
    const s = Date.parse(a.start);
    if (a.rig !== rig || s < from || s >= to) continue;
    const run = runs.get(a.runId);
    rows.push({
      kind: 'trial',
      start: a.start,
      end: a.end,
      startLocal: clockInZone(s, timeZone),
      endLocal: clockInZone(Date.parse(a.end), timeZone),
      minutes: minutes(a.start, a.end),
      runId: a.runId,
      ...(run?.wholePlot !== undefined ? { wholePlot: run.wholePlot } : {}),
      ...(run?.block !== undefined ? { block: run.block } : {}),
      ...(run ? { values: run.values } : {}),
      label: `Trial ${a.runId}${run ? `: ${valuesText(run.values)}` : ''}`,
    });
  }
  for (const act of result.activities) {
    const s = Date.parse(act.start);
    if (act.rig !== rig || s < from || s >= to) continue;
    const changes = act.changes ?? [];
    rows.push({
      kind: act.kind,
      start: act.start,
      end: act.end,
      startLocal: clockInZone(s, timeZone),
      endLocal: clockInZone(Date.parse(act.end), timeZone),
      minutes: minutes(act.start, act.end),
      runId: act.beforeRunId,
      ...(act.kind === 'changeover' ? { values: Object.fromEntries(changes.map((c) => [c.factor, c.to])) } : {}),
      label:
        act.kind === 'changeover'
          ? `Changeover before ${act.beforeRunId}: ${changes.map((c) => `${c.factor} ${String(c.from)} → ${String(c.to)}`).join(', ')}`
          : `Upkeep before ${act.beforeRunId} (battery, inspection)`,
    });
  }
  const order = { upkeep: 0, changeover: 1, trial: 2 } as const;
  return rows.sort((x, y) => Date.parse(x.start) - Date.parse(y.start) || order[x.kind] - order[y.kind]);
}

/** The printable day sheet of one rig: its hours that day and every trial, changeover and upkeep. */
export function daySheet(request: ScheduleRequest, result: ScheduleResult, rig: string, day: string, timeZone = request.timeZone ?? 'UTC'): DaySheet {
  const rigDef = request.rigs.find((r) => r.name === rig);
  if (!rigDef) throw invalidInput('rig', `no rig is named "${rig}"`);
  const available = dayAvailability(rigDef, day, timeZone);
  const from = wallTimeToUtc(day, '00:00', timeZone);
  const to = wallTimeToUtc(addCalendarDays(day, 1), '00:00', timeZone);
  const rows = rigRows(request, result, rig, timeZone, from, to);
  const sum = (kind: SheetRow['kind']) => rows.filter((r) => r.kind === kind).reduce((s, r) => s + r.minutes, 0);
  return {
    rig,
    day,
    timeZone,
    available,
    rows,
    totals: {
      trials: rows.filter((r) => r.kind === 'trial').length,
      trialMinutes: sum('trial'),
      changeovers: rows.filter((r) => r.kind === 'changeover').length,
      changeoverMinutes: sum('changeover'),
      upkeeps: rows.filter((r) => r.kind === 'upkeep').length,
      upkeepMinutes: sum('upkeep'),
    },
  };
}

export interface WeekGrid {
  timeZone: string;
  days: string[];
  rigs: string[];
  /** cells[dayIndex][rigIndex]: that rig's hours and rows on that day. */
  cells: { available: TimeInterval[]; rows: SheetRow[] }[][];
}

/** The week grid: one cell per day and rig, each with the rig's hours and its rows that day. */
export function weekGrid(request: ScheduleRequest, result: ScheduleResult, from: string, days: number, timeZone = request.timeZone ?? 'UTC'): WeekGrid {
  assertTimeZone(timeZone);
  parseDay(from, 'from');
  if (!Number.isInteger(days) || days < 1 || days > 62) throw invalidInput('days', 'days must be a whole number from 1 to 62');
  const dayList = Array.from({ length: days }, (_, k) => addCalendarDays(from, k));
  return {
    timeZone,
    days: dayList,
    rigs: request.rigs.map((r) => r.name),
    cells: dayList.map((day) => {
      const start = wallTimeToUtc(day, '00:00', timeZone);
      const end = wallTimeToUtc(addCalendarDays(day, 1), '00:00', timeZone);
      return request.rigs.map((rig) => ({ available: dayAvailability(rig, day, timeZone), rows: rigRows(request, result, rig.name, timeZone, start, end) }));
    }),
  };
}

export interface RigCalendarOptions {
  /** Calendar title; defaults to "Saltus – <rig>". */
  name?: string;
  /** DTSTAMP of every event (ISO instant); defaults to the earliest event start, so the file is reproducible. */
  stamp?: string;
  /** Include changeovers and upkeep as their own events (default true). */
  includeActivities?: boolean;
}

/** An iCalendar (RFC 5545) file with one rig's trials, changeovers and upkeep, times in UTC. */
export function rigCalendar(request: ScheduleRequest, result: ScheduleResult, rig: string, options: RigCalendarOptions = {}): string {
  if (!request.rigs.some((r) => r.name === rig)) throw invalidInput('rig', `no rig is named "${rig}"`);
  const rows = rigRows(request, result, rig, request.timeZone ?? 'UTC', -Infinity, Infinity).filter((r) => options.includeActivities !== false || r.kind === 'trial');
  const stamp = options.stamp !== undefined ? new Date(parseInstant(options.stamp, 'stamp')) : new Date(rows.length ? Date.parse(rows[0]!.start) : 0);
  const slug = rig.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'rig';
  const calendar = ical({ name: options.name ?? `Saltus – ${rig}`, prodId: { company: 'Saltus', product: 'Week planner', language: 'EN' } });
  for (const row of rows) {
    calendar.createEvent({
      id: `${row.kind}-${row.runId}-${slug}@saltus`,
      start: new Date(row.start),
      end: new Date(row.end),
      stamp,
      summary: row.label,
      location: rig,
      description:
        row.kind === 'trial'
          ? [`Run ${row.runId}`, row.wholePlot !== undefined ? `Whole plot ${String(row.wholePlot)}` : '', row.block !== undefined ? `Block ${String(row.block)}` : '']
              .filter(Boolean)
              .join('\n')
          : row.label,
    });
  }
  return calendar.toString();
}
