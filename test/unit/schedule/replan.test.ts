import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { planSchedule, replan, type ScheduleRequest } from '@/domain/schedule';
import { requestArbitrary, scheduleViolations } from './invariants';

const days = [2, 3, 4].map((d) => ({ start: `2026-03-0${d}T08:00:00.000Z`, end: `2026-03-0${d}T12:00:00.000Z` }));

const base: ScheduleRequest = {
  runs: [
    { id: 'g1', values: { surface: 'grass' }, durationMinutes: 30, wholePlot: 'A' },
    { id: 'g2', values: { surface: 'grass' }, durationMinutes: 30, wholePlot: 'A' },
    { id: 'g3', values: { surface: 'grass' }, durationMinutes: 30, wholePlot: 'A' },
    { id: 'i1', values: { surface: 'ice' }, durationMinutes: 30, wholePlot: 'B' },
    { id: 'i2', values: { surface: 'ice' }, durationMinutes: 30, wholePlot: 'B' },
    { id: 's1', values: { surface: 'grass' }, durationMinutes: 30 },
  ],
  rigs: [
    { name: 'R1', available: days },
    { name: 'R2', available: days },
  ],
  changeoverMinutes: { surface: 40 },
};

describe('replan', () => {
  it('keeps finished trials, repeats a failed one after now, drops a skipped one', () => {
    const fixed = [
      { runId: 'g1', rig: 'R1', start: '2026-03-02T08:00:00.000Z', end: '2026-03-02T08:30:00.000Z' },
      { runId: 'g2', rig: 'R1', start: '2026-03-02T08:30:00.000Z', end: '2026-03-02T09:00:00.000Z' },
    ];
    const res = replan(base, fixed, [{ kind: 'trial_failed', runId: 'g2' }, { kind: 'trial_skipped', runId: 's1' }], '2026-03-02T09:15:00Z');
    expect(res.assignments.find((a) => a.runId === 'g1')).toEqual(fixed[0]);
    const g2 = res.assignments.find((a) => a.runId === 'g2')!;
    // The rest of whole plot A (g2 again, then g3) continues on R1 from now on, in design order.
    expect(g2).toMatchObject({ rig: 'R1', start: '2026-03-02T09:15:00.000Z' });
    expect(res.assignments.find((a) => a.runId === 'g3')).toMatchObject({ rig: 'R1', start: '2026-03-02T09:45:00.000Z' });
    expect(res.unscheduled).toEqual([{ runId: 's1', reason: 'skipped: taken out of the plan' }]);
    for (const a of res.assignments) if (a.runId !== 'g1') expect(Date.parse(a.start)).toBeGreaterThanOrEqual(Date.parse('2026-03-02T09:15:00Z'));
    expect(scheduleViolations(base, res, { allowPartialWholePlots: true })).toEqual([]);
  });

  it('keeps a rig that goes down empty for that time', () => {
    const res = replan(base, [], [{ kind: 'rig_down', rig: 'R2', start: '2026-03-02T00:00:00Z' }], '2026-03-02T08:00:00Z');
    expect(res.assignments.every((a) => a.rig === 'R1')).toBe(true);
    expect(res.unscheduled).toEqual([]);
  });

  it('charges a changeover from the level the rig was left at', () => {
    const fixed = [{ runId: 'i1', rig: 'R1', start: '2026-03-02T08:00:00.000Z', end: '2026-03-02T08:30:00.000Z' }];
    const req: ScheduleRequest = { ...base, runs: [base.runs[3]!, { id: 'g', values: { surface: 'grass' }, durationMinutes: 30 }], rigs: [base.rigs[0]!] };
    const res = replan(req, fixed, [], '2026-03-02T08:30:00Z');
    expect(res.assignments.find((a) => a.runId === 'g')!.start).toBe('2026-03-02T09:10:00.000Z');
    expect(res.changeovers).toBe(1);
  });

  it('names unknown runs and rigs in events', () => {
    expect(() => replan(base, [], [{ kind: 'trial_skipped', runId: 'nope' }])).toThrow(expect.objectContaining({ field: 'events[0].runId' }));
    expect(() => replan(base, [], [{ kind: 'rig_down', rig: 'R9', start: '2026-03-02T08:00:00Z' }])).toThrow(expect.objectContaining({ field: 'events[0].rig' }));
  });

  it('property: fixed trials unchanged, new work after now and outside downtime, invariants hold', () => {
    fc.assert(
      fc.property(requestArbitrary, fc.integer({ min: 0, max: 100 }), fc.integer({ min: 0, max: 3 }), (req, cutPercent, downRig) => {
        const first = planSchedule(req);
        if (first.assignments.length === 0) return;
        const times = first.assignments.map((a) => Date.parse(a.end)).sort((a, b) => a - b);
        const now = times[Math.min(times.length - 1, Math.floor((cutPercent / 100) * times.length))]!;
        const fixed = first.assignments.filter((a) => Date.parse(a.end) <= now);
        const rig = req.rigs[downRig % req.rigs.length]!.name;
        const down = { start: now + 3_600_000, end: now + 6 * 3_600_000 };
        const res = replan(req, fixed, [{ kind: 'rig_down', rig, start: new Date(down.start).toISOString(), end: new Date(down.end).toISOString() }], new Date(now).toISOString());
        for (const f of fixed) expect(res.assignments).toContainEqual(f);
        const fixedIds = new Set(fixed.map((f) => f.runId));
        for (const a of res.assignments) {
          if (fixedIds.has(a.runId)) continue;
          expect(Date.parse(a.start)).toBeGreaterThanOrEqual(now);
          if (a.rig === rig) expect(Date.parse(a.end) <= down.start || Date.parse(a.start) >= down.end).toBe(true);
        }
        expect(scheduleViolations(req, res, { allowPartialWholePlots: true })).toEqual([]);
        expect(res.changeovers).toBeGreaterThanOrEqual(res.lowerBound.changeovers);
        expect(res.makespanMinutes).toBeGreaterThanOrEqual(res.lowerBound.makespanMinutes - 1e-6);
      }),
      { numRuns: 60, seed: 1999 },
    );
  });
});
