import { describe, expect, it } from 'vitest';
import { foldLine, scopeCalendarUids } from '@/server/plan/calendar-scope';

const octets = (s: string) => new TextEncoder().encode(s).length;

describe('campaign-scoped iCalendar UIDs (RFC 5545 §3.1 line folding)', () => {
  it('appends the campaign to each UID and keeps every other line', () => {
    const ics = ['BEGIN:VCALENDAR', 'BEGIN:VEVENT', 'UID:trial-12-bench-1@saltus', 'SUMMARY:Trial 12', 'END:VEVENT', 'END:VCALENDAR', ''].join('\r\n');
    const out = scopeCalendarUids(ics, 'cmp01');
    expect(out).toBe(['BEGIN:VCALENDAR', 'BEGIN:VEVENT', 'UID:trial-12-bench-1-cmp01@saltus', 'SUMMARY:Trial 12', 'END:VEVENT', 'END:VCALENDAR', ''].join('\r\n'));
  });

  it('unfolds before rewriting and folds long lines to at most 75 octets without splitting characters', () => {
    const long = `SUMMARY:${'Changeover before 12: surface turf mat → wet glass, '.repeat(3)}`;
    const ics = `BEGIN:VEVENT\r\n${foldLine(long)}\r\nUID:changeover-12-a-very-long-rig-name-for-the-bench-in-the-back-room\r\n @saltus\r\nEND:VEVENT`;
    const out = scopeCalendarUids(ics, 'c1');
    for (const line of out.split('\r\n')) expect(octets(line)).toBeLessThanOrEqual(75);
    const unfolded = out.replace(/\r\n /g, '');
    expect(unfolded).toContain(long);
    expect(unfolded).toContain('UID:changeover-12-a-very-long-rig-name-for-the-bench-in-the-back-room-c1@saltus');
  });
});
