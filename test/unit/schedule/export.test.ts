import { describe, expect, it } from 'vitest';
import { dayAvailability, daySheet, planSchedule, rigCalendar, weekGrid, workingAvailability, type ScheduleRequest } from '@/domain/schedule';

const available = workingAvailability({ workdays: [1, 2, 3, 4, 5], startTime: '08:00', endTime: '12:00', timeZone: 'Europe/Berlin' }, '2026-03-27', 5);
const req: ScheduleRequest = {
  runs: Array.from({ length: 10 }, (_, i) => ({ id: `r${i}`, values: { surface: i < 5 ? 'grass' : 'ice', payload: i % 3 }, durationMinutes: 45, wholePlot: Math.floor(i / 5) })),
  rigs: [{ name: 'Rig 1', available }],
  changeoverMinutes: { surface: 40 },
  upkeep: { everyTrials: 4, minutes: 10 },
  timeZone: 'Europe/Berlin',
};
const result = planSchedule(req);

describe('schedule views and export', () => {
  it('clips a rig’s hours to a local day, across the spring change', () => {
    expect(dayAvailability(req.rigs[0]!, '2026-03-27', 'Europe/Berlin')).toEqual([{ start: '2026-03-27T07:00:00.000Z', end: '2026-03-27T11:00:00.000Z' }]);
    expect(dayAvailability(req.rigs[0]!, '2026-03-30', 'Europe/Berlin')).toEqual([{ start: '2026-03-30T06:00:00.000Z', end: '2026-03-30T10:00:00.000Z' }]);
    expect(dayAvailability(req.rigs[0]!, '2026-03-28', 'Europe/Berlin')).toEqual([]);
  });

  it('builds a day sheet in local time with trials, changeovers and upkeep', () => {
    expect(result.unscheduled).toEqual([]);
    const friday = daySheet(req, result, 'Rig 1', '2026-03-27');
    expect(friday.rows[0]).toMatchObject({ kind: 'trial', startLocal: '08:00', endLocal: '08:45', runId: 'r0' });
    expect(friday.totals.trials).toBe(5);
    const monday = daySheet(req, result, 'Rig 1', '2026-03-30');
    // After the change to summer time the sheet still reads 08:00 local.
    expect(monday.rows[0]!.startLocal).toBe('08:00');
    const kinds = [...friday.rows, ...monday.rows].map((r) => r.kind);
    expect(kinds).toContain('changeover');
    expect(kinds).toContain('upkeep');
    const tuesday = daySheet(req, result, 'Rig 1', '2026-03-31');
    const all = [friday, monday, tuesday].reduce((s, d) => s + d.totals.trials, 0);
    expect(all).toBe(10);
  });

  it('lays out a week grid by day and rig', () => {
    const grid = weekGrid(req, result, '2026-03-27', 5);
    expect(grid.days).toEqual(['2026-03-27', '2026-03-28', '2026-03-29', '2026-03-30', '2026-03-31']);
    expect(grid.cells[1]![0]!.rows).toEqual([]);
    expect(grid.cells.flat().flatMap((c) => c.rows).filter((r) => r.kind === 'trial')).toHaveLength(10);
  });

  // RFC 5545 (iCalendar): CRLF line ends (§3.1), lines folded at 75 octets (§3.1), VERSION:2.0 and
  // PRODID required (§3.7.3, §3.7.4), UTC date-times written with a trailing Z (§3.3.5); from memory.
  it('exports an RFC 5545 calendar per rig, reproducible byte for byte', () => {
    const text = rigCalendar(req, result, 'Rig 1');
    expect(text).toBe(rigCalendar(req, result, 'Rig 1'));
    const lines = text.split('\r\n');
    expect(lines[0]).toBe('BEGIN:VCALENDAR');
    expect(lines).toContain('VERSION:2.0');
    expect(lines.some((l) => l.startsWith('PRODID:'))).toBe(true);
    expect(text.match(/BEGIN:VEVENT/g)!.length).toBe(result.assignments.length + result.activities.length);
    expect(text).toContain('DTSTART:20260327T070000Z');
    expect(lines.every((l) => new TextEncoder().encode(l).length <= 75)).toBe(true);
    expect(text.replace(/\r\n/g, '')).not.toMatch(/\n/);
    const trialsOnly = rigCalendar(req, result, 'Rig 1', { includeActivities: false, stamp: '2026-03-01T00:00:00Z' });
    expect(trialsOnly.match(/BEGIN:VEVENT/g)!.length).toBe(10);
    expect(trialsOnly).toContain('DTSTAMP:20260301T000000Z');
  });
});
