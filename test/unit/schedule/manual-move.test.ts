import { describe, expect, it } from 'vitest';
import { planSchedule, validateManualMove, type ScheduleRequest } from '@/domain/schedule';

const day = { start: '2026-03-02T08:00:00.000Z', end: '2026-03-02T16:00:00.000Z' };
const req: ScheduleRequest = {
  runs: [
    { id: 'a1', values: { surface: 'grass', gain: 20 }, durationMinutes: 30, wholePlot: 'A' },
    { id: 'a2', values: { surface: 'grass', gain: 10 }, durationMinutes: 30, wholePlot: 'A' },
    { id: 'b1', values: { surface: 'ice', gain: 30 }, durationMinutes: 30, wholePlot: 'B' },
    { id: 'b2', values: { surface: 'ice', gain: 10 }, durationMinutes: 30, wholePlot: 'B' },
  ],
  rigs: [{ name: 'R1', available: [day] }, { name: 'R2', available: [day] }],
  changeoverMinutes: { surface: 40, gain: 0 },
};
const result = planSchedule(req);

describe('validateManualMove', () => {
  it('accepts a whole plot moved to a free slot and lays its runs out in design order', () => {
    const target = result.assignments.find((a) => a.runId === 'a1')!.rig === 'R1' ? 'R2' : 'R1';
    const check = validateManualMove(req, result, { wholePlot: 'A', rig: target, start: '2026-03-02T14:00:00Z' });
    expect(check.problems).toEqual([]);
    expect(check.ok).toBe(true);
    expect(check.moved.map((m) => m.runId)).toEqual(['a1', 'a2']);
    // Rig `target` ends with ice; grass needs a 40-minute swap first.
    expect(check.moved[0]!.start).toBe('2026-03-02T14:40:00.000Z');
    expect(check.assignments).toHaveLength(4);
  });

  it('refuses sorting runs inside a whole plot and says why', () => {
    const check = validateManualMove(req, result, { wholePlot: 'A', rig: 'R1', start: '2026-03-02T14:00:00Z', runOrder: ['a2', 'a1'] });
    expect(check.ok).toBe(false);
    expect(check.problems[0]!.code).toBe('reordered_whole_plot');
    expect(check.problems[0]!.message).toMatch(/randomisation/);
    expect(check.problems[0]!.message).toMatch(/Ganju & Lucas 1999/);
    expect(check.problems[0]!.message).toMatch(/Design order: a1, a2/);
  });

  it('refuses moving one run out of its whole plot', () => {
    const check = validateManualMove(req, result, { runId: 'b2', rig: 'R1', start: '2026-03-02T14:00:00Z' });
    expect(check.problems[0]!.code).toBe('split_whole_plot');
  });

  it('finds overlaps, missing changeover time and slots outside the hours', () => {
    const onR1 = result.assignments.filter((a) => a.rig === 'R1');
    const other = onR1[0]!.runId.startsWith('a') ? 'B' : 'A';
    const clash = validateManualMove(req, result, { wholePlot: other, rig: 'R1', start: onR1[0]!.start });
    expect(clash.ok).toBe(false);
    expect(clash.problems.map((p) => p.code)).toContain('overlap');
    const late = validateManualMove(req, result, { wholePlot: other, rig: 'R1', start: '2026-03-02T15:30:00Z' });
    expect(late.problems.map((p) => p.code)).toContain('outside_hours');
  });
});
