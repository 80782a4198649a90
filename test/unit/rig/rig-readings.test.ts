/** The tablet's own plausibility check before an entry is queued (src/components/rig-readings.ts). */
import { describe, expect, it } from 'vitest';
import { checkTabletReadings } from '@/components/rig-readings';

const responses = [
  { name: 'apex_height', unit: 'mm' },
  { name: 'energy', unit: 'mJ' },
  { name: 'hops_completed' },
];
const entry = { passed: true, failureReason: '', startedAt: '2026-03-02T11:50:00Z', finishedAt: '2026-03-02T11:52:00Z' };
const context = { now: '2026-03-02T12:00:00Z', robotMassKg: 0.001 };

describe('tablet readings check', () => {
  it('accepts plausible readings', () => {
    expect(checkTabletReadings(responses, { apex_height: 182, energy: 4.2, hops_completed: 3 }, entry, context).errors).toEqual([]);
  });

  it('refuses an apex of several metres, naming the response field', () => {
    const check = checkTabletReadings(responses, { apex_height: 5000 }, entry, context);
    expect(check.errors[0]!.field).toBe('observations.apex_height');
    expect(check.errors[0]!.message).toMatch(/unit/);
  });

  it('refuses negative energy and a finish time in the future', () => {
    expect(checkTabletReadings(responses, { energy: -1 }, entry, context).errors[0]!.field).toBe('observations.energy');
    const future = checkTabletReadings(responses, {}, { ...entry, finishedAt: '2026-03-02T13:00:00Z' }, context);
    expect(future.errors.map((e) => e.field)).toContain('finishedAt');
  });
});
