import { describe, expect, it } from 'vitest';
import { DomainError } from '@/domain/errors';
import { RANDOMISATION_RESTRICTION_MESSAGE, rigCalendar, weekGrid } from '@/domain/schedule';
import { scopeCalendarUids } from '@/server/plan/calendar-scope';
import { checkMove, deriveActivities, planView, type PlanInput, type PlanRun } from '@/server/plan/week-plan';

// Europe/Berlin in January is UTC+1: 09:00 local = 08:00Z. 2026-01-05 is a Monday.
const rigs: PlanInput['rigs'] = [
  { id: 'r1', name: 'Bench 1', timeZone: 'Europe/Berlin', workdays: [1, 2, 3, 4, 5], startTime: '09:00', endTime: '17:00' },
  { id: 'r2', name: 'Bench 2', timeZone: 'Europe/Berlin', workdays: [1, 2, 3, 4, 5], startTime: '09:00', endTime: '17:00' },
];

function run(n: number, surface: string, payload: number, wholePlot: number | null, slot: [string, string, string] | null, state = 'scheduled'): PlanRun {
  return { id: `id${n}`, runNumber: n, values: { surface, payload }, wholePlot, block: null, state, slot: slot ? { rigId: slot[0], start: slot[1], end: slot[2] } : null };
}

// Whole plot 1 (turf, runs 1-2) then whole plot 2 (glass, runs 3-4) on Bench 1 with a 40-min surface change between.
const base: PlanInput = {
  rigs,
  runs: [
    run(1, 'turf', 1, 1, ['r1', '2026-01-05T08:00:00Z', '2026-01-05T08:20:00Z']),
    run(2, 'turf', 0, 1, ['r1', '2026-01-05T08:20:00Z', '2026-01-05T08:40:00Z']),
    run(3, 'glass', 1, 2, ['r1', '2026-01-05T09:20:00Z', '2026-01-05T09:40:00Z']),
    run(4, 'glass', 0, 2, ['r1', '2026-01-05T09:40:00Z', '2026-01-05T10:00:00Z']),
    run(5, 'soil', 1, 3, null, 'planned'),
    run(6, 'turf', 1, null, ['r2', '2026-01-05T08:00:00Z', '2026-01-05T08:20:00Z'], 'done'),
  ],
  changeoverMinutes: { surface: 40 },
  trialMinutes: 20,
  today: '2026-01-05',
};

describe('the stored plan as a schedule request and result', () => {
  it('derives one changeover ending where the next trial starts, listing the level change', () => {
    const view = planView(base);
    expect(view.from).toBe('2026-01-05');
    expect(view.firstOpenDay).toBe('2026-01-05');
    expect(planView({ ...base, runs: [base.runs[5]!, run(2, 'turf', 0, 1, ['r1', '2026-01-08T08:20:00Z', '2026-01-08T08:40:00Z'])] }).firstOpenDay).toBe('2026-01-08');
    expect(view.result.assignments.map((a) => a.runId)).toEqual(['1', '6', '2', '3', '4']);
    expect(view.result.activities).toEqual([
      { rig: 'Bench 1', kind: 'changeover', start: '2026-01-05T08:40:00.000Z', end: '2026-01-05T09:20:00.000Z', beforeRunId: '3', changes: [{ factor: 'surface', from: 'turf', to: 'glass' }] },
    ]);
    expect(view.result.changeovers).toBe(1);
    expect(view.result.changeoverMinutesTotal).toBe(40);
    expect(view.result.unscheduled).toEqual([{ runId: '5', reason: 'not placed yet' }]);
  });

  it('puts a changeover right after the previous trial when a night lies between them', () => {
    const view = planView({
      ...base,
      runs: [run(1, 'turf', 1, 1, ['r1', '2026-01-05T15:40:00Z', '2026-01-05T16:00:00Z']), run(2, 'glass', 1, 2, ['r1', '2026-01-06T08:00:00Z', '2026-01-06T08:20:00Z'])],
    });
    expect(view.result.activities[0]).toMatchObject({ start: '2026-01-05T16:00:00.000Z', end: '2026-01-05T16:40:00.000Z', beforeRunId: '2' });
  });

  it('keeps whole plots only for untried runs, and no changeover for factors that cost nothing', () => {
    const view = planView({ ...base, changeoverMinutes: { surface: 0 } });
    expect(view.result.activities).toEqual([]);
    const done = view.request.runs.find((r) => r.id === '6')!;
    expect(done.wholePlot).toBeUndefined();
    expect(view.request.runs.find((r) => r.id === '3')!.wholePlot).toBe(2);
  });

  it('feeds the week grid and the iCalendar export: one VEVENT per trial and per changeover', () => {
    const view = planView(base);
    const grid = weekGrid(view.request, view.result, '2026-01-05', 5);
    const monday = grid.cells[0]![0]!.rows;
    expect(monday.map((r) => r.kind)).toEqual(['trial', 'trial', 'changeover', 'trial', 'trial']);
    const ics = rigCalendar(view.request, view.result, 'Bench 1');
    expect(ics.startsWith('BEGIN:VCALENDAR')).toBe(true);
    expect(ics.match(/BEGIN:VEVENT/g)).toHaveLength(5);
    expect(rigCalendar(view.request, view.result, 'Bench 1', { includeActivities: false }).match(/BEGIN:VEVENT/g)).toHaveLength(4);
    const scoped = scopeCalendarUids(ics, 'campaign7');
    expect(scoped.match(/BEGIN:VEVENT/g)).toHaveLength(5);
    expect(scoped.match(/^UID:.*-campaign7@saltus\r?$/gm)).toHaveLength(5);
  });
});

describe('deriveActivities', () => {
  it('adds up the minutes of every hard-to-change factor that changes, and lists each change', () => {
    const request = {
      runs: [
        { id: 'a', values: { surface: 'turf', leg: 'short', payload: 0 } },
        { id: 'b', values: { surface: 'glass', leg: 'long', payload: 1 } },
        { id: 'c', values: { surface: 'glass', leg: 'long', payload: 0 } },
      ],
      rigs: [{ name: 'R', available: [{ start: '2026-01-05T08:00:00Z', end: '2026-01-05T16:00:00Z' }] }],
      changeoverMinutes: { surface: 40, leg: 15, payload: 0 },
    };
    const acts = deriveActivities(request, [
      { runId: 'a', rig: 'R', start: '2026-01-05T08:00:00Z', end: '2026-01-05T08:20:00Z' },
      { runId: 'b', rig: 'R', start: '2026-01-05T09:30:00Z', end: '2026-01-05T09:50:00Z' },
      { runId: 'c', rig: 'R', start: '2026-01-05T09:50:00Z', end: '2026-01-05T10:10:00Z' },
    ]);
    expect(acts).toEqual([
      {
        rig: 'R',
        kind: 'changeover',
        start: '2026-01-05T08:35:00.000Z',
        end: '2026-01-05T09:30:00.000Z',
        beforeRunId: 'b',
        changes: [
          { factor: 'surface', from: 'turf', to: 'glass' },
          { factor: 'leg', from: 'short', to: 'long' },
        ],
      },
    ]);
  });
});

describe('manual moves on the stored plan', () => {
  it('refuses runs sorted inside a whole plot, naming runOrder and saying why', () => {
    const view = planView(base);
    try {
      checkMove(view, { wholePlot: 2, rig: 'Bench 2', start: '2026-01-06T08:00:00Z', runOrder: ['4', '3'] });
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(DomainError);
      expect((e as DomainError).field).toBe('runOrder');
      expect((e as DomainError).code).toBe('invalid_input');
      expect((e as DomainError).message).toContain(RANDOMISATION_RESTRICTION_MESSAGE);
    }
  });

  it('accepts a whole plot moved as it is to another rig and day: its surface change first, then its runs in design order', () => {
    const view = planView(base);
    // Bench 2 last ran turf (run 6), so glass needs its 40-min changeover from the chosen start.
    const check = checkMove(view, { wholePlot: 2, rig: 'Bench 2', start: '2026-01-06T08:00:00Z', runOrder: ['3', '4'] });
    expect(check.moved).toEqual([
      { runId: '3', rig: 'Bench 2', start: '2026-01-06T08:40:00.000Z', end: '2026-01-06T09:00:00.000Z' },
      { runId: '4', rig: 'Bench 2', start: '2026-01-06T09:00:00.000Z', end: '2026-01-06T09:20:00.000Z' },
    ]);
  });

  it('refuses a move onto another trial (field start), a single run of a whole plot, and a tried run', () => {
    const view = planView(base);
    expect(() => checkMove(view, { wholePlot: 2, rig: 'Bench 1', start: '2026-01-05T08:10:00Z' })).toThrow(expect.objectContaining({ field: 'start', code: 'conflict' }));
    expect(() => checkMove(view, { runId: '3', rig: 'Bench 2', start: '2026-01-06T08:00:00Z' })).toThrow(expect.objectContaining({ code: 'invalid_input', field: 'runId' }));
    expect(() => checkMove(view, { wholePlot: 2, rig: 'Bench 2', start: '2026-01-06T08:00:00Z', runOrder: ['3'] })).toThrow(expect.objectContaining({ field: 'runOrder' }));
    expect(() => checkMove(view, { runId: '6', rig: 'Bench 1', start: '2026-01-06T08:00:00Z' })).toThrow(expect.objectContaining({ field: 'runId' }));
    expect(() => checkMove(view, { wholePlot: 2, rig: 'Bench 9', start: '2026-01-06T08:00:00Z' })).toThrow(expect.objectContaining({ field: 'rig' }));
  });
});
