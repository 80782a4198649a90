/**
 * Wall-clock time in an IANA zone ↔ UTC instants, from the offsets Intl.DateTimeFormat reports.
 * date-fns 4 has no zone helpers built in, so the conversion lives here.
 */
import { invalidInput } from '@/domain/errors';

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    try {
      f = new Intl.DateTimeFormat('en-US', {
        timeZone,
        hourCycle: 'h23',
        year: 'numeric',
        month: '2-digit',
        day: '2-digit',
        hour: '2-digit',
        minute: '2-digit',
        second: '2-digit',
      });
    } catch {
      throw invalidInput('timeZone', `"${timeZone}" is not a known IANA time zone; use a name such as "Europe/Berlin" or "UTC"`);
    }
    formatters.set(timeZone, f);
  }
  return f;
}

/** Throws an invalid-input error naming `field` when the zone is unknown. */
export function assertTimeZone(timeZone: string, field = 'timeZone'): void {
  try {
    formatterFor(timeZone);
  } catch {
    throw invalidInput(field, `"${timeZone}" is not a known IANA time zone; use a name such as "Europe/Berlin" or "UTC"`);
  }
}

export interface WallClock {
  year: number;
  month: number; // 1..12
  day: number;
  hour: number;
  minute: number;
  second: number;
}

/** The wall clock in `timeZone` at the instant `utcMs`. */
export function wallClockAt(utcMs: number, timeZone: string): WallClock {
  const parts = formatterFor(timeZone).formatToParts(new Date(utcMs));
  const get = (type: string) => Number(parts.find((p) => p.type === type)?.value ?? '0');
  return { year: get('year'), month: get('month'), day: get('day'), hour: get('hour') % 24, minute: get('minute'), second: get('second') };
}

/** Offset of `timeZone` from UTC at the instant `utcMs`, in milliseconds (Berlin in winter: +3 600 000). */
export function zoneOffsetMs(utcMs: number, timeZone: string): number {
  const w = wallClockAt(utcMs, timeZone);
  const asUtc = Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second);
  return asUtc - (utcMs - (((utcMs % 1000) + 1000) % 1000));
}

/**
 * The UTC instant at which the wall clock in `timeZone` reads the given local time. A wall time that
 * does not exist (skipped by a spring-forward change) maps to the instant just after the gap, shifted
 * by the gap's length; a repeated wall time (autumn change) maps to its first occurrence.
 */
export function wallTimeToUtc(date: string, time: string, timeZone: string): number {
  const d = parseDay(date);
  const t = parseClock(time);
  const naive = Date.UTC(d.year, d.month - 1, d.day, t.hour, t.minute);
  const day = 86_400_000;
  // Offsets a day before and after; a zone changes its offset at most once in between.
  const before = zoneOffsetMs(naive - day, timeZone);
  const after = zoneOffsetMs(naive + day, timeZone);
  const valid = [naive - before, naive - after].filter((utc) => utc + zoneOffsetMs(utc, timeZone) === naive);
  if (valid.length > 0) return Math.min(...valid);
  // The wall time was skipped: read it with the offset in force before the change.
  return naive - before;
}

export function parseDay(date: string, field = 'date'): { year: number; month: number; day: number } {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(date);
  if (!m) throw invalidInput(field, `"${date}" is not a calendar day; write it as yyyy-MM-dd`);
  const year = Number(m[1]);
  const month = Number(m[2]);
  const day = Number(m[3]);
  const check = new Date(Date.UTC(year, month - 1, day));
  if (check.getUTCFullYear() !== year || check.getUTCMonth() !== month - 1 || check.getUTCDate() !== day) {
    throw invalidInput(field, `"${date}" is not a real calendar day`);
  }
  return { year, month, day };
}

export function parseClock(time: string, field = 'time'): { hour: number; minute: number } {
  const m = /^(\d{2}):(\d{2})$/.exec(time);
  const hour = m ? Number(m[1]) : NaN;
  const minute = m ? Number(m[2]) : NaN;
  if (!m || hour > 24 || minute > 59 || (hour === 24 && minute !== 0)) {
    throw invalidInput(field, `"${time}" is not a clock time; write it as HH:mm (00:00 to 24:00)`);
  }
  return { hour, minute };
}

/** yyyy-MM-dd of a calendar day `offset` days after `date` (pure calendar arithmetic, no zone). */
export function addCalendarDays(date: string, offset: number): string {
  const d = parseDay(date);
  const t = new Date(Date.UTC(d.year, d.month - 1, d.day + offset));
  return t.toISOString().slice(0, 10);
}

/** ISO weekday of a calendar day: 1 = Monday … 7 = Sunday. */
export function isoWeekday(date: string): number {
  const d = parseDay(date);
  const wd = new Date(Date.UTC(d.year, d.month - 1, d.day)).getUTCDay();
  return wd === 0 ? 7 : wd;
}

/** The calendar day (yyyy-MM-dd) in `timeZone` that contains the instant `utcMs`. */
export function dayInZone(utcMs: number, timeZone: string): string {
  const w = wallClockAt(utcMs, timeZone);
  return `${String(w.year).padStart(4, '0')}-${String(w.month).padStart(2, '0')}-${String(w.day).padStart(2, '0')}`;
}

/** HH:mm of the instant `utcMs` in `timeZone`. */
export function clockInZone(utcMs: number, timeZone: string): string {
  const w = wallClockAt(utcMs, timeZone);
  return `${String(w.hour).padStart(2, '0')}:${String(w.minute).padStart(2, '0')}`;
}
