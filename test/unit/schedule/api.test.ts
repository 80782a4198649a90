import { beforeAll, describe, expect, it } from 'vitest';
import { handleScheduleRequest } from '@/server/api/schedules';
import { POST as routePOST } from '@/app/api/v1/schedules/route';
import { signed, unitDatabase } from '../../support/auth';

// Routes check credentials: a throw-away database holds the test's API token.
const POST = signed(routePOST);
beforeAll(unitDatabase);

const body = {
  runs: [
    { id: 'r1', values: { surface: 'ice' }, durationMinutes: 30 },
    { id: 'r2', values: { surface: 'grass' }, durationMinutes: 30 },
  ],
  rigs: [{ name: 'A', available: [{ start: '2026-03-02T08:00:00Z', end: '2026-03-02T10:00:00Z' }] }],
  changeoverMinutes: { surface: 40 },
};

describe('POST /api/v1/schedules', () => {
  it('answers assignments, changeovers, makespan, bounds and unscheduled runs', () => {
    const res = handleScheduleRequest(body);
    expect(res.assignments).toEqual([
      { runId: 'r1', rig: 'A', start: '2026-03-02T08:00:00.000Z', end: '2026-03-02T08:30:00.000Z' },
      { runId: 'r2', rig: 'A', start: '2026-03-02T09:10:00.000Z', end: '2026-03-02T09:40:00.000Z' },
    ]);
    expect(res.changeovers).toBe(1);
    expect(res.makespanMinutes).toBe(100);
    expect(res.lowerBound.changeovers).toBe(1);
    expect(res.unscheduled).toEqual([]);
  });

  it('names the field of a malformed request', () => {
    expect(() => handleScheduleRequest({ ...body, rigs: [{ name: 'A', available: [{ start: 'Monday 8am', end: '2026-03-02T10:00:00Z' }] }] })).toThrow(
      expect.objectContaining({ field: 'rigs[0].available[0].start' }),
    );
    expect(() => handleScheduleRequest({ ...body, timeZone: 'Nowhere/Town' })).toThrow(expect.objectContaining({ field: 'timeZone' }));
  });

  it('maps errors to 400 JSON through the route and schedules what fits when rig hours run short', async () => {
    const bad = await POST(new Request('http://localhost/api/v1/schedules', { method: 'POST', body: JSON.stringify({ runs: [] }) }));
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.field).toBe('rigs');

    const short = await POST(
      new Request('http://localhost/api/v1/schedules', {
        method: 'POST',
        body: JSON.stringify({ ...body, runs: [...body.runs, { id: 'r3', values: { surface: 'ice' }, durationMinutes: 60 }] }),
      }),
    );
    expect(short.status).toBe(200);
    const json = await short.json();
    // The two ice runs go together; the grass run would need a 40-minute swap that no longer fits.
    expect(json.unscheduled).toEqual([{ runId: 'r2', reason: expect.stringMatching(/not enough rig time/) }]);
    expect(json.infeasibility[0]).toMatchObject({ constraint: 'rig_hours', requiredMinutes: 160, availableMinutes: 120, shortByMinutes: 40 });
  });

  it('re-plans when finished trials and events are sent', () => {
    const res = handleScheduleRequest({
      ...body,
      fixed: [{ runId: 'r1', rig: 'A', start: '2026-03-02T08:00:00Z', end: '2026-03-02T08:30:00Z' }],
      events: [{ kind: 'rig_down', rig: 'A', start: '2026-03-02T08:30:00Z', end: '2026-03-02T08:50:00Z' }],
      now: '2026-03-02T08:30:00Z',
    });
    expect(res.assignments[0]).toEqual({ runId: 'r1', rig: 'A', start: '2026-03-02T08:00:00.000Z', end: '2026-03-02T08:30:00.000Z' });
    // The swap to grass waits until the rig is back at 08:50.
    expect(res.assignments[1]).toMatchObject({ runId: 'r2', start: '2026-03-02T09:30:00.000Z' });
    expect(() => handleScheduleRequest({ ...body, events: [{ kind: 'rig_down', rig: 'A' }] })).toThrow(expect.objectContaining({ field: 'events[0].start' }));
  });

  it('turns rig calendars into hours over the horizon', () => {
    const res = handleScheduleRequest({
      runs: [
        { id: 'r1', values: { surface: 'ice' }, durationMinutes: 40 },
        { id: 'r2', values: { surface: 'ice' }, durationMinutes: 40 },
      ],
      rigs: [{ name: 'A', calendar: { workdays: [1, 2, 3, 4, 5], startTime: '08:00', endTime: '09:00', timeZone: 'America/New_York' } }],
      horizon: { from: '2026-03-06', days: 4 },
      changeoverMinutes: { surface: 40 },
    });
    // Friday 6 March 08:00 EST is 13:00Z; Monday 9 March 08:00 EDT is 12:00Z.
    expect(res.assignments.map((a) => a.start)).toEqual(['2026-03-06T13:00:00.000Z', '2026-03-09T12:00:00.000Z']);
    expect(() => handleScheduleRequest({ runs: [], rigs: [{ name: 'A', calendar: { workdays: [1], startTime: '08:00', endTime: '09:00', timeZone: 'UTC' } }] })).toThrow(
      expect.objectContaining({ field: 'horizon' }),
    );
    expect(() =>
      handleScheduleRequest({ runs: [], horizon: { from: '2026-03-02', days: 1 }, rigs: [{ name: 'A', calendar: { workdays: [1], startTime: '08:00', endTime: '09:00', timeZone: 'Atlantis/Lost' } }] }),
    ).toThrow(expect.objectContaining({ field: 'rigs[0].calendar.timeZone' }));
  });
});
