import { describe, expect, it } from 'vitest';
import { checkReadings } from '@/domain/metrics/plausibility';
import { failureReasonText, observationField, parseFailureReason, readingFields, standardReadings } from '@/domain/metrics/standard-readings';
import { checkTrialEntry } from '@/domain/metrics/trial-entry';

describe('standard rig readings', () => {
  it('offers the four readings under fixed names and units when the campaign declares none', () => {
    const f = readingFields([{ name: 'stiffness', unit: 'N/m' }]);
    expect(f.standard.map((s) => [s.name, s.unit, s.response])).toEqual([
      ['apex_height', 'mm', false],
      ['hops_completed', 'count', false],
      ['distance_travelled', 'mm', false],
      ['energy_drawn', 'mJ', false],
    ]);
    expect(f.others.map((o) => o.name)).toEqual(['stiffness']);
  });

  it('uses a campaign response that stands for a reading (name alike, unit of the right quantity), once', () => {
    const f = readingFields([
      { name: 'peak_apex', unit: 'cm' },
      { name: 'energy', unit: 'J' },
      { name: 'energy_per_hop', unit: 'mJ' },
      { name: 'hops', unit: '' },
      { name: 'distance', unit: 's' },
    ]);
    expect(f.standard.map((s) => `${s.name} ${s.unit} ${s.toSi}`)).toEqual(['peak_apex cm 0.01', 'hops  1', 'distance_travelled mm 0.001', 'energy J 1']);
    // energy per hop is not the energy drawn; a "distance" in seconds is not a length.
    expect(f.others.map((o) => o.name)).toEqual(['energy_per_hop', 'distance']);
    expect(observationField([{ name: 'peak_apex', unit: 'cm' }], 'apex_height')).toBeUndefined();
    expect(observationField([], 'energy_drawn')?.unit).toBe('mJ');
  });

  it('a response with the standard name is that reading whatever its unit', () => {
    const f = readingFields([{ name: 'apex_height', unit: 'm' }, { name: 'apex_cm', unit: 'cm' }]);
    expect(f.standard[0]).toMatchObject({ name: 'apex_height', unit: 'm', toSi: 1, response: true });
    expect(f.others.map((o) => o.name)).toEqual(['apex_cm']);
  });

  it('converts the readings to SI for the checks', () => {
    const { readings, fieldOf } = standardReadings([], { apex_height: 182, energy_drawn: 950, distance_travelled: 420, hops_completed: 3 });
    expect(readings.apexHeightM).toBeCloseTo(0.182, 12);
    expect(readings.energyJ).toBeCloseTo(0.95, 12);
    expect(readings.distanceM).toBeCloseTo(0.42, 12);
    expect(readings.hopsCompleted).toBe(3);
    expect(fieldOf.energyJ).toBe('energy_drawn');
  });

  it('keeps a failure reason as kind and words', () => {
    expect(failureReasonText('fell', '')).toBe('fell');
    expect(failureReasonText('broke', ' leg spring ')).toBe('broke: leg spring');
    expect(failureReasonText('other', 'battery connector')).toBe('battery connector');
    expect(parseFailureReason('stalled: motor hot')).toEqual({ kind: 'stalled', text: 'motor hot' });
    expect(parseFailureReason('battery connector')).toEqual({ kind: 'other', text: 'battery connector' });
    expect(parseFailureReason('')).toEqual({ kind: '', text: '' });
  });
});

describe('entry check shared by tablet and server', () => {
  const entry = { passed: true, failureReason: '', startedAt: '2026-03-02T11:50:00Z', finishedAt: '2026-03-02T11:52:00Z' };
  const ctx = { now: '2026-03-02T12:00:00Z', robotMassKg: 0.001 };

  it('names the field and quotes the value in the unit entered', () => {
    const c = checkTrialEntry([], { apex_height: 5000 }, entry, ctx);
    expect(c.errors).toEqual([{ field: 'observations.apex_height', message: expect.stringMatching(/^apex_height of 5000 mm is beyond 3 m \(3000 mm\); check the unit \(this field is in mm, e.g. 250 for 25 cm\)$/) }]);
    expect(checkTrialEntry([], { energy_drawn: -1 }, entry, ctx).errors[0]!.message).toMatch(/^energy_drawn of -1 mJ is negative/);
  });

  it('refuses an observation that is no reading of the campaign', () => {
    expect(checkTrialEntry([{ name: 'apex', unit: 'mm' }], { apex_height: 100 }, entry, ctx).errors[0]!.field).toBe('observations.apex_height');
  });

  it('refuses a failed trial without a reason', () => {
    expect(checkTrialEntry([], {}, { ...entry, passed: false }, ctx).errors[0]!.field).toBe('failureReason');
  });
});

describe('hops against the trial time', () => {
  // A 0.20 m apex needs about 0.40 s of flight per hop (common practice, no source).
  const base = { apexHeightM: 0.2, startedAt: '2026-03-02T11:59:00Z', finishedAt: '2026-03-02T11:59:10Z' };
  const ctx = { now: '2026-03-02T12:00:00Z' };
  it('accepts hops that fit', () => {
    expect(checkReadings({ ...base, hopsCompleted: 20 }, ctx)).toEqual({ errors: [], warnings: [] });
  });
  it('questions more hops than fit in the trial time, naming the most that fit (a warning: the start may have been pressed late)', () => {
    const c = checkReadings({ ...base, hopsCompleted: 60 }, ctx);
    expect(c.errors).toEqual([]);
    expect(c.warnings[0]!.field).toBe('hopsCompleted');
    expect(c.warnings[0]!.message).toMatch(/at most 24 such hops/);
  });
});
