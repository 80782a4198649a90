import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { planSchedule, type ScheduleRequest } from '@/domain/schedule';
import { prepare } from '@/domain/schedule/prepare';
import { emptyRigState, placementsOf, placeUnit, type RigState } from '@/domain/schedule/rig-timeline';
import { requestArbitrary, scheduleViolations } from './invariants';
import { benchmarkRequest } from '../../../bench/cases/schedule';

function permutations<T>(xs: T[]): T[][] {
  if (xs.length <= 1) return [xs];
  return xs.flatMap((x, i) => permutations([...xs.slice(0, i), ...xs.slice(i + 1)]).map((rest) => [x, ...rest]));
}

/** Brute force: every order of the whole plots and every rig for each, scored (unplaced runs, changeovers, finish). */
function bruteForce(req: ScheduleRequest): [number, number, number] {
  const p = prepare(req);
  const rigs = p.rigs.length;
  let best: [number, number, number] = [Infinity, Infinity, Infinity];
  for (const order of permutations(p.units)) {
    for (let code = 0; code < rigs ** order.length; code++) {
      const states: RigState[] = p.rigs.map(emptyRigState);
      let unplaced = 0;
      let c = code;
      for (const unit of order) {
        const r = c % rigs;
        c = Math.floor(c / rigs);
        const next = placeUnit(states[r]!, unit, p);
        if (next) states[r] = next;
        else unplaced += unit.runs.length;
      }
      const changes = states.reduce((s, st) => s + placementsOf(st).reduce((a, x) => a + x.changes, 0), 0);
      const finish = Math.max(...states.map((s) => s.lastEnd));
      const key: [number, number, number] = [unplaced, changes, finish];
      if (key[0] < best[0] || (key[0] === best[0] && (key[1] < best[1] || (key[1] === best[1] && key[2] < best[2])))) best = key;
    }
  }
  return best;
}

const tinyRequest = fc
  .record({
    runs: fc.array(
      fc.record({ surface: fc.constantFrom('grass', 'ice', 'wet glass'), minutes: fc.integer({ min: 10, max: 120 }), plot: fc.option(fc.integer({ min: 0, max: 2 }), { nil: undefined }) }),
      { minLength: 1, maxLength: 7 },
    ),
    rigs: fc.integer({ min: 1, max: 2 }),
    hours: fc.integer({ min: 1, max: 6 }),
  })
  .map(({ runs, rigs, hours }): ScheduleRequest => ({
    runs: runs.map((r, i) => ({
      id: `r${i}`,
      values: { surface: r.plot === undefined ? r.surface : ['grass', 'ice', 'wet glass'][r.plot]! },
      durationMinutes: r.minutes,
      ...(r.plot === undefined ? {} : { wholePlot: r.plot }),
    })),
    rigs: Array.from({ length: rigs }, (_, k) => ({
      name: `R${k}`,
      available: [0, 1].map((d) => ({ start: new Date(Date.UTC(2026, 2, 2 + d, 8)).toISOString(), end: new Date(Date.UTC(2026, 2, 2 + d, 8 + hours)).toISOString() })),
    })),
    changeoverMinutes: { surface: 40 },
  }))
  .filter((req) => prepare(req).units.length <= 5);

describe('grouped solver', () => {
  it('keeps every invariant on the benchmark campaign (500 runs, 5 rigs, Berlin hours)', () => {
    const req = benchmarkRequest();
    const res = planSchedule(req);
    expect(res.unscheduled).toEqual([]);
    expect(res.changeovers).toBe(res.lowerBound.changeovers);
    expect(scheduleViolations(req, res)).toEqual([]);
  });

  it('matches exhaustive search on tiny instances (unscheduled runs, changeovers, finish)', () => {
    fc.assert(
      fc.property(tinyRequest, (req) => {
        const best = bruteForce(req);
        const res = planSchedule(req);
        const finish = res.assignments.length ? Math.max(...res.assignments.map((a) => Date.parse(a.end))) : -Infinity;
        expect([res.unscheduled.length, res.changeovers, finish]).toEqual(best);
        expect(scheduleViolations(req, res)).toEqual([]);
      }),
      { numRuns: 80, seed: 424242 },
    );
  });

  it('keeps every feasibility invariant and never beats its lower bounds', () => {
    fc.assert(
      fc.property(requestArbitrary, (req) => {
        const res = planSchedule(req);
        expect(scheduleViolations(req, res)).toEqual([]);
        expect(res.changeovers).toBeGreaterThanOrEqual(res.lowerBound.changeovers);
        expect(res.makespanMinutes).toBeGreaterThanOrEqual(res.lowerBound.makespanMinutes - 1e-6);
        // Never worse than filling in design order.
        const seq = planSchedule({ ...req, strategy: 'sequential' });
        expect(res.unscheduled.length).toBeLessThanOrEqual(seq.unscheduled.length);
        if (res.unscheduled.length === seq.unscheduled.length) expect(res.changeovers).toBeLessThanOrEqual(seq.changeovers);
      }),
      { numRuns: 100, seed: 8675309 },
    );
  });

  it('groups whole plots by surface on each rig, keeping the design order inside every whole plot', () => {
    const surfaces = ['grass', 'ice', 'wet glass', 'loose soil'];
    const runs = Array.from({ length: 48 }, (_, i) => ({
      id: `r${i}`,
      values: { surface: surfaces[Math.floor(i / 3) % 4]!, gain: [10, 30, 20][i % 3]! },
      durationMinutes: 15,
      wholePlot: Math.floor(i / 3),
    }));
    const day = (d: number) => ({ start: `2026-03-0${d}T08:00:00Z`, end: `2026-03-0${d}T16:00:00Z` });
    const req: ScheduleRequest = {
      runs,
      rigs: [{ name: 'A', available: [day(2), day(3)] }, { name: 'B', available: [day(2), day(3)] }],
      changeoverMinutes: { surface: 40, gain: 0 },
    };
    const res = planSchedule(req);
    expect(res.unscheduled).toEqual([]);
    expect(res.changeovers).toBe(2); // 4 surfaces on 2 rigs: 2 per rig, 1 swap each
    expect(res.lowerBound.changeovers).toBe(2);
    expect(scheduleViolations(req, res)).toEqual([]);
    // Same-surface whole plots on a rig follow the design's order (it costs nothing here).
    for (const rig of ['A', 'B']) {
      const plots = res.assignments.filter((a) => a.rig === rig).map((a) => runs.find((r) => r.id === a.runId)!);
      for (const surface of surfaces) {
        const order = plots.filter((r) => r.values.surface === surface).map((r) => r.wholePlot);
        expect(order).toEqual(order.slice().sort((x, y) => x - y));
      }
    }
    const sequential = planSchedule({ ...req, strategy: 'sequential' });
    expect(sequential.changeovers).toBeGreaterThan(10);
  });

  it('puts blocks that stand for days on their days', () => {
    const runs = Array.from({ length: 12 }, (_, i) => ({ id: `r${i}`, values: { surface: i % 2 ? 'ice' : 'grass' }, durationMinutes: 30, block: i < 6 ? 'Tue' : 'Mon' }));
    const req: ScheduleRequest = {
      runs,
      rigs: [{ name: 'A', available: [2, 3, 4].map((d) => ({ start: `2026-03-0${d}T07:00:00Z`, end: `2026-03-0${d}T15:00:00Z` })) }],
      changeoverMinutes: { surface: 40 },
      timeZone: 'Europe/Berlin',
      blockDays: { Mon: '2026-03-02', Tue: '2026-03-03' },
    };
    const res = planSchedule(req);
    expect(res.unscheduled).toEqual([]);
    for (const a of res.assignments) {
      const block = runs.find((r) => r.id === a.runId)!.block;
      expect(a.start.slice(0, 10)).toBe(block === 'Mon' ? '2026-03-02' : '2026-03-03');
    }
    // One swap per day at most: grass then ice on Monday, continue on ice on Tuesday, then grass.
    expect(res.changeovers).toBe(2);
    expect(scheduleViolations(req, res)).toEqual([]);
    // The sequential fill keeps blocks on their days too (Tuesday's runs come first in the design).
    const seq = planSchedule({ ...req, strategy: 'sequential' });
    expect(seq.unscheduled).toEqual([]);
    expect(scheduleViolations(req, seq)).toEqual([]);
  });

  it('reports a block that no longer fits on its day', () => {
    const req: ScheduleRequest = {
      runs: Array.from({ length: 5 }, (_, i) => ({ id: `r${i}`, values: {}, durationMinutes: 60, block: 1 })),
      rigs: [{ name: 'A', available: [{ start: '2026-03-02T08:00:00Z', end: '2026-03-02T11:00:00Z' }, { start: '2026-03-03T08:00:00Z', end: '2026-03-03T18:00:00Z' }] }],
      blockDays: { '1': '2026-03-02' },
    };
    const res = planSchedule(req);
    expect(res.assignments).toHaveLength(3);
    expect(res.unscheduled).toHaveLength(2);
    expect(res.infeasibility?.[0]?.constraint).toBe('block_day');
  });
});
