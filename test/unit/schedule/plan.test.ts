import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { clockInZone, planSchedule, workingAvailability, type ScheduleRequest } from '@/domain/schedule';
import { requestArbitrary, scheduleViolations } from './invariants';

const day = (d: string, from: string, to: string) => ({ start: `${d}T${from}:00.000Z`, end: `${d}T${to}:00.000Z` });

describe('planSchedule (sequential fill)', () => {
  it('puts trials back to back inside the available hours', () => {
    const req: ScheduleRequest = {
      strategy: 'sequential',
      runs: [1, 2, 3].map((i) => ({ id: `r${i}`, values: { surface: 'glass' }, durationMinutes: 30 })),
      rigs: [{ name: 'A', available: [day('2026-03-02', '08:00', '10:00')] }],
    };
    const res = planSchedule(req);
    expect(res.assignments).toEqual([
      { runId: 'r1', rig: 'A', start: '2026-03-02T08:00:00.000Z', end: '2026-03-02T08:30:00.000Z' },
      { runId: 'r2', rig: 'A', start: '2026-03-02T08:30:00.000Z', end: '2026-03-02T09:00:00.000Z' },
      { runId: 'r3', rig: 'A', start: '2026-03-02T09:00:00.000Z', end: '2026-03-02T09:30:00.000Z' },
    ]);
    expect(res.makespanMinutes).toBe(90);
    expect(res.lowerBound).toEqual({ changeovers: 0, makespanMinutes: 90 });
    expect(res.unscheduled).toEqual([]);
  });

  it('inserts a changeover gap when a hard-to-change level changes, and none for a zero-minute factor', () => {
    const req: ScheduleRequest = {
      strategy: 'sequential',
      runs: [
        { id: 'a', values: { surface: 'grass', gain: 1 }, durationMinutes: 20 },
        { id: 'b', values: { surface: 'grass', gain: 2 }, durationMinutes: 20 },
        { id: 'c', values: { surface: 'ice', gain: 2 }, durationMinutes: 20 },
      ],
      rigs: [{ name: 'A', available: [day('2026-03-02', '08:00', '12:00')] }],
      changeoverMinutes: { surface: 40, gain: 0 },
    };
    const res = planSchedule(req);
    expect(res.assignments.map((a) => a.start)).toEqual(['2026-03-02T08:00:00.000Z', '2026-03-02T08:20:00.000Z', '2026-03-02T09:20:00.000Z']);
    expect(res.changeovers).toBe(1);
    expect(res.changeoverMinutesTotal).toBe(40);
    expect(res.activities).toEqual([
      { rig: 'A', kind: 'changeover', start: '2026-03-02T08:40:00.000Z', end: '2026-03-02T09:20:00.000Z', beforeRunId: 'c', changes: [{ factor: 'surface', from: 'grass', to: 'ice' }] },
    ]);
    expect(scheduleViolations(req, res)).toEqual([]);
  });

  it('adds upkeep every N trials and keeps the cool-down', () => {
    const req: ScheduleRequest = {
      strategy: 'sequential',
      runs: [1, 2, 3, 4, 5].map((i) => ({ id: `r${i}`, values: {}, durationMinutes: 10 })),
      rigs: [{ name: 'A', available: [day('2026-03-02', '08:00', '12:00')] }],
      upkeep: { everyTrials: 2, minutes: 15, cooldownMinutes: 5 },
    };
    const res = planSchedule(req);
    // r1 08:00, r2 08:15 (cool-down), upkeep 08:25-08:40, r3 08:40, r4 08:55, upkeep 09:05-09:20, r5 09:20
    expect(res.assignments.map((a) => a.start.slice(11, 16))).toEqual(['08:00', '08:15', '08:40', '08:55', '09:20']);
    expect(res.activities.filter((a) => a.kind === 'upkeep').map((a) => [a.start.slice(11, 16), a.end.slice(11, 16)])).toEqual([
      ['08:25', '08:40'],
      ['09:05', '09:20'],
    ]);
    expect(scheduleViolations(req, res)).toEqual([]);
  });

  it('moves a trial that would cross the end of the day to the next interval', () => {
    const req: ScheduleRequest = {
      strategy: 'sequential',
      defaultDurationMinutes: 50,
      runs: [{ id: 'a', values: {} }, { id: 'b', values: {} }],
      rigs: [{ name: 'A', available: [day('2026-03-02', '08:00', '09:30'), day('2026-03-03', '08:00', '09:30')] }],
    };
    const res = planSchedule(req);
    expect(res.assignments.map((a) => a.start)).toEqual(['2026-03-02T08:00:00.000Z', '2026-03-03T08:00:00.000Z']);
  });

  it('keeps a whole plot on one rig, together and in design order', () => {
    const req: ScheduleRequest = {
      strategy: 'sequential',
      runs: [
        { id: 'w1a', values: { surface: 'ice' }, durationMinutes: 30, wholePlot: 1 },
        { id: 'x', values: { surface: 'grass' }, durationMinutes: 30 },
        { id: 'w1b', values: { surface: 'ice' }, durationMinutes: 30, wholePlot: 1 },
        { id: 'w1c', values: { surface: 'ice' }, durationMinutes: 30, wholePlot: 1 },
      ],
      rigs: [
        { name: 'A', available: [day('2026-03-02', '08:00', '12:00')] },
        { name: 'B', available: [day('2026-03-02', '08:00', '12:00')] },
      ],
      changeoverMinutes: { surface: 40 },
    };
    const res = planSchedule(req);
    const onA = res.assignments.filter((a) => a.rig === 'A').map((a) => a.runId);
    expect(onA).toEqual(['w1a', 'w1b', 'w1c']);
    expect(res.assignments.find((a) => a.runId === 'x')!.rig).toBe('B');
    expect(scheduleViolations(req, res)).toEqual([]);
  });

  it('schedules what fits and says which constraint fails by how much', () => {
    const req: ScheduleRequest = {
      strategy: 'sequential',
      runs: [1, 2, 3, 4, 5].map((i) => ({ id: `r${i}`, values: {}, durationMinutes: 60 })),
      rigs: [{ name: 'A', available: [day('2026-03-02', '08:00', '11:00')] }],
    };
    const res = planSchedule(req);
    expect(res.assignments.map((a) => a.runId)).toEqual(['r1', 'r2', 'r3']);
    expect(res.unscheduled.map((u) => u.runId)).toEqual(['r4', 'r5']);
    expect(res.infeasibility?.[0]).toMatchObject({ constraint: 'rig_hours', requiredMinutes: 300, availableMinutes: 180, shortByMinutes: 120 });
    expect(res.unscheduled[0]!.reason).toMatch(/not enough rig time/);
  });

  it('names a trial longer than any interval', () => {
    const req: ScheduleRequest = {
      strategy: 'sequential',
      runs: [{ id: 'long', values: {}, durationMinutes: 90 }, { id: 'short', values: {}, durationMinutes: 30 }],
      rigs: [{ name: 'A', available: [day('2026-03-02', '08:00', '09:00'), day('2026-03-03', '08:00', '09:00')] }],
    };
    const res = planSchedule(req);
    expect(res.assignments.map((a) => a.runId)).toEqual(['short']);
    expect(res.infeasibility).toEqual([expect.objectContaining({ constraint: 'interval_length', shortByMinutes: 30 })]);
  });

  it('refuses duplicate run ids and missing durations with the field named', () => {
    expect(() => planSchedule({ runs: [{ id: 'a', values: {}, durationMinutes: 1 }, { id: 'a', values: {}, durationMinutes: 1 }], rigs: [{ name: 'A', available: [] }] })).toThrow(/appears twice/);
    expect(() => planSchedule({ runs: [{ id: 'a', values: {} }], rigs: [{ name: 'A', available: [] }] })).toThrow(/duration/);
  });
});

describe('planSchedule invariants (property)', () => {
  it('sequential fill: no overlap, inside availability, changeover gaps, whole plots contiguous and in order', () => {
    fc.assert(
      fc.property(requestArbitrary, (req) => {
        const res = planSchedule({ ...req, strategy: 'sequential' });
        expect(scheduleViolations(req, res)).toEqual([]);
        expect(res.changeovers).toBeGreaterThanOrEqual(res.lowerBound.changeovers);
        expect(res.makespanMinutes).toBeGreaterThanOrEqual(res.lowerBound.makespanMinutes - 1e-6);
      }),
      { numRuns: 120, seed: 20260302 },
    );
  });
});

describe('planSchedule edge cases', () => {
  it('says when hours suffice in total but come in pieces too short', () => {
    const req: ScheduleRequest = {
      runs: [1, 2, 3].map((i) => ({ id: `r${i}`, values: {}, durationMinutes: 40 })),
      rigs: [{ name: 'A', available: [day('2026-03-02', '08:00', '09:00'), day('2026-03-03', '08:00', '09:00')] }],
    };
    const res = planSchedule(req);
    expect(res.assignments).toHaveLength(2);
    expect(res.infeasibility).toEqual([expect.objectContaining({ constraint: 'fragmentation', requiredMinutes: 40, availableMinutes: 40 })]);
  });

  it('keeps trials on the local working hours across the New York spring change', () => {
    const available = workingAvailability({ workdays: [1, 2, 3, 4, 5], startTime: '08:00', endTime: '12:00', timeZone: 'America/New_York' }, '2026-03-05', 6);
    const req: ScheduleRequest = {
      runs: Array.from({ length: 12 }, (_, i) => ({ id: `r${i}`, values: {}, durationMinutes: 60 })),
      rigs: [{ name: 'A', available }],
      timeZone: 'America/New_York',
    };
    const res = planSchedule(req);
    expect(res.unscheduled).toEqual([]);
    expect(res.assignments.map((a) => clockInZone(Date.parse(a.start), 'America/New_York'))).toEqual(Array.from({ length: 12 }, (_, i) => `${String(8 + (i % 4)).padStart(2, '0')}:00`));
    // Thursday, Friday, then Monday 9 March after the change: 12:00Z instead of 13:00Z.
    expect(res.assignments[8]!.start).toBe('2026-03-09T12:00:00.000Z');
  });
});

describe('planSchedule with operators', () => {
  it('runs a staffed rig only while one of its operators is on duty, and names who', () => {
    const req: ScheduleRequest = {
      runs: Array.from({ length: 6 }, (_, i) => ({ id: `r${i}`, values: {}, durationMinutes: 60 })),
      rigs: [{ name: 'A', available: [day('2026-03-02', '08:00', '16:00')] }, { name: 'B', available: [day('2026-03-02', '08:00', '09:00')] }],
      operators: [
        { name: 'morning operator', rig: 'A', available: [day('2026-03-02', '08:00', '10:00')] },
        { name: 'afternoon operator', rig: 'A', available: [day('2026-03-02', '13:00', '15:30')] },
      ],
    };
    const res = planSchedule(req);
    const onA = res.assignments.filter((a) => a.rig === 'A');
    expect(onA.map((a) => [a.start.slice(11, 16), a.operator])).toEqual([
      ['08:00', 'morning operator'],
      ['09:00', 'morning operator'],
      ['13:00', 'afternoon operator'],
      ['14:00', 'afternoon operator'],
    ]);
    // Rig B has no operator listed and keeps its own hours.
    expect(res.assignments.filter((a) => a.rig === 'B').map((a) => [a.start.slice(11, 16), a.operator])).toEqual([['08:00', undefined]]);
    expect(res.unscheduled).toHaveLength(1);
    expect(() => planSchedule({ ...req, operators: [{ name: 'x', rig: 'C', available: [] }] })).toThrow(expect.objectContaining({ field: 'operators[0].rig' }));
  });
});
