/**
 * Rig calendars: working hours in the rig's time zone → UTC availability intervals.
 */
import { invalidInput } from '@/domain/errors';
import { addCalendarDays, assertTimeZone, isoWeekday, parseClock, parseDay, wallTimeToUtc } from './time-zone';
import type { TimeInterval } from './types';

export interface RigCalendar {
  /** ISO weekdays the rig works: 1 = Monday … 7 = Sunday. */
  workdays: number[];
  /** Local start and end of the working day, HH:mm; an end at or before the start runs past midnight. */
  startTime: string;
  endTime: string;
  /** IANA time zone the hours are read in. */
  timeZone: string;
  /** Calendar days off (yyyy-MM-dd, local). */
  daysOff?: string[];
  /** Intervals (ISO instants) the rig is blocked, e.g. maintenance. */
  blocked?: TimeInterval[];
}

/** Milliseconds interval [start, end). */
export interface MsInterval {
  start: number;
  end: number;
}

export function parseInstant(value: string, field: string): number {
  const ms = Date.parse(value);
  if (!/^\d{4}-\d{2}-\d{2}T/.test(value) || Number.isNaN(ms)) {
    throw invalidInput(field, `"${value}" is not an ISO 8601 instant; write e.g. 2026-03-02T08:00:00Z`);
  }
  return ms;
}

/** Sort and merge overlapping or touching intervals; drops empty ones. */
export function mergeIntervals(intervals: readonly MsInterval[]): MsInterval[] {
  const sorted = intervals.filter((i) => i.end > i.start).slice().sort((a, b) => a.start - b.start);
  const out: MsInterval[] = [];
  for (const i of sorted) {
    const last = out[out.length - 1];
    if (last && i.start <= last.end) last.end = Math.max(last.end, i.end);
    else out.push({ start: i.start, end: i.end });
  }
  return out;
}

/** `base` minus every interval in `cut`. Both may be unsorted. */
export function subtractIntervals(base: readonly MsInterval[], cut: readonly MsInterval[]): MsInterval[] {
  const cuts = mergeIntervals(cut);
  const out: MsInterval[] = [];
  for (const b of mergeIntervals(base)) {
    let cursor = b.start;
    for (const c of cuts) {
      if (c.end <= cursor || c.start >= b.end) continue;
      if (c.start > cursor) out.push({ start: cursor, end: c.start });
      cursor = Math.max(cursor, c.end);
      if (cursor >= b.end) break;
    }
    if (cursor < b.end) out.push({ start: cursor, end: b.end });
  }
  return out;
}

/** Time in both `a` and `b`. */
export function intersectIntervals(a: readonly MsInterval[], b: readonly MsInterval[]): MsInterval[] {
  return subtractIntervals(a, subtractIntervals(a, b));
}

/**
 * The rig's working time over `days` calendar days from `from` (yyyy-MM-dd), as UTC ISO intervals.
 * Each working day contributes [startTime, endTime) read on the wall clock of `timeZone`, so the
 * UTC hours move with daylight-saving changes; days off and blocked intervals are cut out.
 */
export function workingAvailability(calendar: RigCalendar, from: string, days: number): TimeInterval[] {
  assertTimeZone(calendar.timeZone, 'calendar.timeZone');
  parseDay(from, 'from');
  if (!Number.isInteger(days) || days < 0 || days > 3660) {
    throw invalidInput('days', 'days must be a whole number from 0 to 3660');
  }
  for (const [i, wd] of calendar.workdays.entries()) {
    if (!Number.isInteger(wd) || wd < 1 || wd > 7) {
      throw invalidInput(`calendar.workdays[${i}]`, 'a workday is 1 (Monday) to 7 (Sunday)');
    }
  }
  const start = parseClock(calendar.startTime, 'calendar.startTime');
  const end = parseClock(calendar.endTime, 'calendar.endTime');
  const overnight = end.hour * 60 + end.minute <= start.hour * 60 + start.minute;
  const daysOff = new Set(calendar.daysOff ?? []);
  for (const [i, d] of (calendar.daysOff ?? []).entries()) parseDay(d, `calendar.daysOff[${i}]`);
  const workdays = new Set(calendar.workdays);

  const shifts: MsInterval[] = [];
  for (let k = 0; k < days; k++) {
    const date = addCalendarDays(from, k);
    if (!workdays.has(isoWeekday(date)) || daysOff.has(date)) continue;
    const s = wallTimeToUtc(date, calendar.startTime, calendar.timeZone);
    const e = wallTimeToUtc(overnight ? addCalendarDays(date, 1) : date, calendar.endTime, calendar.timeZone);
    if (e > s) shifts.push({ start: s, end: e });
  }
  const blocked = (calendar.blocked ?? []).map((b, i) => ({
    start: parseInstant(b.start, `calendar.blocked[${i}].start`),
    end: parseInstant(b.end, `calendar.blocked[${i}].end`),
  }));
  return subtractIntervals(shifts, blocked).map(toIsoInterval);
}

export function toIsoInterval(i: MsInterval): TimeInterval {
  return { start: new Date(i.start).toISOString(), end: new Date(i.end).toISOString() };
}
