import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { clockInZone, dayInZone, isoWeekday, workingAvailability, wallTimeToUtc, zoneOffsetMs } from '@/domain/schedule';
import { DomainError } from '@/domain/errors';

// Daylight-saving dates used below, from the rules in force (from memory): the EU changes on the last
// Sunday of March and October at 01:00 UTC (Directive 2000/84/EC); the US on the second Sunday of
// March and the first Sunday of November at 02:00 local time (Energy Policy Act of 2005).
// 2026: EU 29 March and 25 October; US 8 March and 1 November.

const weekdays = [1, 2, 3, 4, 5];

describe('wall clock to UTC', () => {
  it('reads Berlin and New York offsets on both sides of a change', () => {
    expect(zoneOffsetMs(Date.parse('2026-03-28T12:00:00Z'), 'Europe/Berlin')).toBe(3_600_000);
    expect(zoneOffsetMs(Date.parse('2026-03-30T12:00:00Z'), 'Europe/Berlin')).toBe(7_200_000);
    expect(zoneOffsetMs(Date.parse('2026-03-07T12:00:00Z'), 'America/New_York')).toBe(-5 * 3_600_000);
    expect(zoneOffsetMs(Date.parse('2026-03-09T12:00:00Z'), 'America/New_York')).toBe(-4 * 3_600_000);
  });

  it('maps a skipped wall time forward by the gap and a repeated one to its first occurrence', () => {
    // 02:30 does not exist in Berlin on 29 March 2026; it reads as 03:30 CEST = 01:30Z.
    expect(new Date(wallTimeToUtc('2026-03-29', '02:30', 'Europe/Berlin')).toISOString()).toBe('2026-03-29T01:30:00.000Z');
    // 02:30 happens twice on 25 October 2026: first at CEST (00:30Z), then at CET (01:30Z).
    expect(new Date(wallTimeToUtc('2026-10-25', '02:30', 'Europe/Berlin')).toISOString()).toBe('2026-10-25T00:30:00.000Z');
    expect(new Date(wallTimeToUtc('2026-11-01', '01:30', 'America/New_York')).toISOString()).toBe('2026-11-01T05:30:00.000Z');
    expect(new Date(wallTimeToUtc('2026-03-08', '02:30', 'America/New_York')).toISOString()).toBe('2026-03-08T07:30:00.000Z');
  });
});

describe('workingAvailability', () => {
  it('keeps 08:00-16:00 local across the spring change in Berlin', () => {
    const a = workingAvailability({ workdays: weekdays, startTime: '08:00', endTime: '16:00', timeZone: 'Europe/Berlin' }, '2026-03-26', 5);
    expect(a).toEqual([
      { start: '2026-03-26T07:00:00.000Z', end: '2026-03-26T15:00:00.000Z' },
      { start: '2026-03-27T07:00:00.000Z', end: '2026-03-27T15:00:00.000Z' },
      { start: '2026-03-30T06:00:00.000Z', end: '2026-03-30T14:00:00.000Z' },
    ]);
  });

  it('keeps 08:00-16:00 local across the autumn change in New York', () => {
    const a = workingAvailability({ workdays: weekdays, startTime: '08:00', endTime: '16:00', timeZone: 'America/New_York' }, '2026-10-30', 4);
    expect(a).toEqual([
      { start: '2026-10-30T12:00:00.000Z', end: '2026-10-30T20:00:00.000Z' },
      { start: '2026-11-02T13:00:00.000Z', end: '2026-11-02T21:00:00.000Z' },
    ]);
  });

  it('gives a shift spanning the change its true length', () => {
    // Sunday night shift 00:00-06:00 in Berlin on 29 March 2026 lasts 5 hours; on 25 October, 7.
    const spring = workingAvailability({ workdays: [7], startTime: '00:00', endTime: '06:00', timeZone: 'Europe/Berlin' }, '2026-03-29', 1);
    expect(Date.parse(spring[0]!.end) - Date.parse(spring[0]!.start)).toBe(5 * 3_600_000);
    const autumn = workingAvailability({ workdays: [7], startTime: '00:00', endTime: '06:00', timeZone: 'Europe/Berlin' }, '2026-10-25', 1);
    expect(Date.parse(autumn[0]!.end) - Date.parse(autumn[0]!.start)).toBe(7 * 3_600_000);
  });

  it('runs a shift past midnight when the end is not after the start', () => {
    const a = workingAvailability({ workdays: [1], startTime: '22:00', endTime: '02:00', timeZone: 'UTC' }, '2026-03-02', 1);
    expect(a).toEqual([{ start: '2026-03-02T22:00:00.000Z', end: '2026-03-03T02:00:00.000Z' }]);
  });

  it('cuts out days off and blocked intervals', () => {
    const a = workingAvailability(
      {
        workdays: weekdays,
        startTime: '09:00',
        endTime: '17:00',
        timeZone: 'UTC',
        daysOff: ['2026-03-03'],
        blocked: [{ start: '2026-03-02T12:00:00Z', end: '2026-03-02T13:00:00Z' }, { start: '2026-03-04T00:00:00Z', end: '2026-03-04T10:00:00Z' }],
      },
      '2026-03-02',
      3,
    );
    expect(a).toEqual([
      { start: '2026-03-02T09:00:00.000Z', end: '2026-03-02T12:00:00.000Z' },
      { start: '2026-03-02T13:00:00.000Z', end: '2026-03-02T17:00:00.000Z' },
      { start: '2026-03-04T10:00:00.000Z', end: '2026-03-04T17:00:00.000Z' },
    ]);
  });

  it('names the field for an unknown zone or a bad clock time', () => {
    expect(() => workingAvailability({ workdays: [1], startTime: '08:00', endTime: '16:00', timeZone: 'Mars/Olympus' }, '2026-03-02', 1)).toThrow(DomainError);
    expect(() => workingAvailability({ workdays: [1], startTime: '8am', endTime: '16:00', timeZone: 'UTC' }, '2026-03-02', 1)).toThrow(
      expect.objectContaining({ field: 'calendar.startTime' }),
    );
    expect(() => workingAvailability({ workdays: [1], startTime: '08:00', endTime: '16:00', timeZone: 'UTC' }, '2026-02-30', 1)).toThrow(/real calendar day/);
  });
});

describe('workingAvailability (property)', () => {
  it('every interval starts and ends at the local clock times, on a working day, in any zone and season', () => {
    const zones = ['Europe/Berlin', 'America/New_York', 'Australia/Sydney', 'Asia/Kolkata', 'America/Santiago', 'UTC'];
    fc.assert(
      fc.property(
        fc.constantFrom(...zones),
        fc.integer({ min: 0, max: 364 }),
        fc.integer({ min: 4, max: 11 }),
        fc.integer({ min: 1, max: 10 }),
        fc.subarray([1, 2, 3, 4, 5, 6, 7], { minLength: 1 }),
        (timeZone, dayOfYear, startHour, hours, workdays) => {
          const from = new Date(Date.UTC(2026, 0, 1 + dayOfYear)).toISOString().slice(0, 10);
          const startTime = `${String(startHour).padStart(2, '0')}:30`;
          const endTime = `${String(startHour + hours).padStart(2, '0')}:30`;
          const intervals = workingAvailability({ workdays, startTime, endTime, timeZone }, from, 14);
          for (const iv of intervals) {
            const s = Date.parse(iv.start);
            const e = Date.parse(iv.end);
            // None of these zones changes its clock between 04:00 and 22:00 local time (from memory).
            expect(clockInZone(s, timeZone)).toBe(startTime);
            expect(clockInZone(e, timeZone)).toBe(endTime);
            expect(e - s).toBe(hours * 3_600_000);
            expect(workdays).toContain(isoWeekday(dayInZone(s, timeZone)));
          }
          const expected = Array.from({ length: 14 }, (_, k) => new Date(Date.UTC(2026, 0, 1 + dayOfYear + k)).toISOString().slice(0, 10)).filter((d) =>
            workdays.includes(isoWeekday(d)),
          ).length;
          expect(intervals).toHaveLength(expected);
        },
      ),
      { numRuns: 100, seed: 31 },
    );
  });
});
