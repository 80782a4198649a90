import { describe, expect, it } from 'vitest';
import { checkReadings } from '@/domain/metrics/plausibility';

const now = '2026-03-01T12:00:00Z';
const ctx = { now, robotHeightM: 0.02, robotMassKg: 0.001 };

function fields(list: { field: string }[]) {
  return list.map((i) => i.field);
}

describe('readings plausibility', () => {
  it('accepts a normal set of readings without comment', () => {
    const r = checkReadings(
      { apexHeightM: 0.2, hopsCompleted: 5, distanceM: 0.8, energyJ: 2, passed: true, startedAt: '2026-03-01T11:50:00Z', finishedAt: '2026-03-01T11:52:00Z' },
      ctx,
    );
    expect(r).toEqual({ errors: [], warnings: [] });
  });

  it('refuses negative energy and says how to fix it', () => {
    const r = checkReadings({ energyJ: -0.5 }, ctx);
    expect(fields(r.errors)).toEqual(['energyJ']);
    expect(r.errors[0]!.message).toMatch(/energyJ.*≥ 0/);
  });

  it('refuses an apex of several metres and warns above 1 m or 30 body heights', () => {
    expect(fields(checkReadings({ apexHeightM: 4 }, ctx).errors)).toEqual(['apexHeightM']);
    expect(checkReadings({ apexHeightM: 4 }, ctx).errors[0]!.message).toMatch(/unit/);
    const high = checkReadings({ apexHeightM: 1.5 }, { now });
    expect(high.errors).toEqual([]);
    expect(fields(high.warnings)).toEqual(['apexHeightM']);
    expect(high.warnings[0]!.message).toMatch(/common practice, no source/);
    // 0.8 m is 40 body heights of a 2 cm robot.
    const tall = checkReadings({ apexHeightM: 0.8 }, ctx);
    expect(tall.errors).toEqual([]);
    expect(tall.warnings[0]!.message).toMatch(/body heights/);
    expect(checkReadings({ apexHeightM: -0.01 }, ctx).errors[0]!.field).toBe('apexHeightM');
  });

  it('refuses times in the future and a finish before the start', () => {
    const future = checkReadings({ startedAt: '2026-03-01T13:00:00Z' }, ctx);
    expect(fields(future.errors)).toEqual(['startedAt']);
    expect(future.errors[0]!.message).toMatch(/future/);
    // Within the clock tolerance a time is accepted.
    expect(checkReadings({ finishedAt: '2026-03-01T12:01:00Z' }, ctx).errors).toEqual([]);
    const swapped = checkReadings({ startedAt: '2026-03-01T11:00:00Z', finishedAt: '2026-03-01T10:00:00Z' }, ctx);
    expect(fields(swapped.errors)).toEqual(['finishedAt']);
    expect(fields(checkReadings({ startedAt: 'yesterday' }, ctx).errors)).toEqual(['startedAt']);
  });

  it('refuses a failure without a reason, and questions a pass with one', () => {
    expect(fields(checkReadings({ passed: false }, ctx).errors)).toEqual(['failureReason']);
    expect(fields(checkReadings({ passed: false, failureReason: '  ' }, ctx).errors)).toEqual(['failureReason']);
    expect(checkReadings({ passed: false, failureReason: 'leg spring snapped' }, ctx).errors).toEqual([]);
    expect(fields(checkReadings({ passed: true, failureReason: 'fell' }, ctx).warnings)).toEqual(['failureReason']);
  });

  it('refuses fractional or negative hop counts and negative distances', () => {
    expect(fields(checkReadings({ hopsCompleted: 2.5 }, ctx).errors)).toEqual(['hopsCompleted']);
    expect(fields(checkReadings({ hopsCompleted: -1 }, ctx).errors)).toEqual(['hopsCompleted']);
    expect(fields(checkReadings({ distanceM: -1 }, ctx).errors)).toEqual(['distanceM']);
    expect(fields(checkReadings({ energyJ: Number.NaN }, ctx).errors)).toEqual(['energyJ']);
  });

  it('warns when the energy drawn is below the potential energy of the hops (a unit slip)', () => {
    // 1 g lifted 0.2 m five times needs about 9.8 mJ.
    const r = checkReadings({ apexHeightM: 0.2, hopsCompleted: 5, energyJ: 0.002 }, ctx);
    expect(r.errors).toEqual([]);
    expect(fields(r.warnings)).toEqual(['energyJ']);
  });

  it('treats null and empty values as not entered', () => {
    expect(checkReadings({ apexHeightM: null, startedAt: '', failureReason: null, passed: null }, ctx)).toEqual({ errors: [], warnings: [] });
  });
});
