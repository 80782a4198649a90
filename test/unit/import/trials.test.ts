import { describe, expect, it } from 'vitest';
import type { Factor, ResponseDefinition } from '@/domain/factors';
import { trialsToStore, validateTrialImport } from '@/domain/import/trials';

// An invented campaign: payload, controller gain and surface; apex height and energy as responses.
const factors: Factor[] = [
  { name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' },
  { name: 'gain', kind: 'discrete', values: [10, 20, 30] },
  { name: 'surface', kind: 'categorical', levels: ['grass', 'ice', 'wet glass'] },
];
const responses: ResponseDefinition[] = [
  { name: 'apex', unit: 'm', goal: 'maximize' },
  { name: 'energy', unit: 'J', goal: 'minimize' },
];
const mapping = {
  'Payload (mg)': 'payload',
  Gain: 'gain',
  Surface: 'surface',
  'Apex (mm)': 'apex',
  'Energy (mWh)': 'energy',
  When: 'startedAt',
  OK: 'passed',
  Why: 'failureReason',
  Remarks: 'notes',
  Ignored: '',
};
const units = { 'Payload (mg)': 'mg', 'Apex (mm)': 'mm', 'Energy (mWh)': 'mWh' };
const header = 'Payload (mg),Gain,Surface,Apex (mm),Energy (mWh),When,OK,Why,Remarks,Ignored';

describe('past-trial CSV import: mapping, units, row-by-row report', () => {
  it('accepts a valid file, converting units and normalising levels', () => {
    const csv = `${header}\n500,20,Grass,180,0.1,2025-11-03T14:05:00Z,yes,,"first try, windy",x\n1500,30,wet glass,95.5,0.2,2025-11-03 15:00,no,other: slipped,,\n`;
    const report = validateTrialImport(csv, mapping, units, factors, responses, { now: '2026-01-01T00:00:00Z' });
    expect(report.fileErrors).toEqual([]);
    expect(report.valid).toBe(true);
    expect(report.validCount).toBe(2);
    const [a, b] = report.rows;
    expect(a!.line).toBe(2);
    expect(a!.values.factors).toEqual({ payload: 0.5, gain: 20, surface: 'grass' });
    expect(a!.values.responses.apex).toBeCloseTo(0.18, 12);
    expect(a!.values.responses.energy).toBeCloseTo(0.36, 12);
    expect(a!.values.notes).toBe('first try, windy');
    expect(a!.values.passed).toBe(true);
    expect(b!.values.passed).toBe(false);
    expect(b!.values.failureReason).toBe('slipped');
    expect(b!.values.startedAt).toBe('2025-11-03T15:00:00.000Z');
    expect(b!.warnings.map((w) => w.field)).toEqual(['startedAt']);
    expect(trialsToStore(report)).toHaveLength(2);
  });

  it('reports each bad row with its line, the field and the fix', () => {
    const csv = [
      header,
      '500,20,grass,180,0.1,2025-11-03T14:05:00Z,yes,,,', // fine
      '2500,25,sand,abc,0.1,2027-01-01T00:00:00Z,maybe,,,', // payload out of range, gain not allowed, unknown level, apex not a number, future, passed unclear
      '"1000",10,ice,,,,,,"two',
      'lines",', // a quoted note across two lines
      ',10,ice,100,0.1,,,,,', // blank payload
    ].join('\n');
    const report = validateTrialImport(csv, mapping, units, factors, responses, { now: '2026-01-01T00:00:00Z' });
    expect(report.fileErrors).toEqual([]);
    expect(report.valid).toBe(false);
    expect(report.rows.map((r) => r.line)).toEqual([2, 3, 4, 6]);
    expect(report.validCount).toBe(2);
    expect(report.invalidCount).toBe(2);
    const bad = report.rows[1]!;
    expect(bad.errors.map((e) => e.field)).toEqual(['payload', 'gain', 'surface', 'apex', 'startedAt', 'passed']);
    expect(bad.errors[0]!.message).toMatch(/outside the range of 'payload' \[0, 2\]/);
    expect(bad.errors[1]!.message).toMatch(/10, 20, 30/);
    expect(bad.errors[2]!.message).toMatch(/grass, ice, wet glass/);
    expect(report.rows[2]!.values.notes).toBe('two\nlines');
    expect(report.rows[2]!.values.responses).toEqual({ apex: null, energy: null });
    expect(report.rows[3]!.errors[0]!.message).toMatch(/blank/);
    // Nothing is stored from an invalid file unless the user accepts only the valid rows.
    expect(() => trialsToStore(report)).toThrow(/2 of 4 rows are invalid \(first on line 3/);
    expect(trialsToStore(report, true)).toHaveLength(2);
  });

  it('refuses a mapping that misses a factor, names an unknown target or mixes quantities', () => {
    const csv = `${header}\n500,20,grass,180,0.1,,,,,\n`;
    const { Gain: _gain, ...withoutGain } = mapping;
    const r1 = validateTrialImport(csv, withoutGain, units, factors, responses);
    expect(r1.valid).toBe(false);
    expect(r1.fileErrors.map((e) => e.field)).toEqual(['gain']);
    expect(r1.validCount).toBe(0);
    expect(() => trialsToStore(r1, true)).toThrow(/factor 'gain' has no column/);
    const r2 = validateTrialImport(csv, { ...mapping, Remarks: 'comments' }, units, factors, responses);
    expect(r2.fileErrors[0]!.message).toMatch(/not a factor, response, standard reading or trial field/);
    const r3 = validateTrialImport(csv, mapping, { ...units, 'Apex (mm)': 'g' }, factors, responses);
    expect(r3.fileErrors[0]!.message).toMatch(/mass.*length/);
    const r4 = validateTrialImport(csv, { ...mapping, Ignored: 'apex' }, units, factors, responses);
    expect(r4.fileErrors[0]!.message).toMatch(/both mapped/);
    const r5 = validateTrialImport(csv, { ...mapping, Missing: 'notes' }, units, factors, responses);
    expect(r5.fileErrors[0]!.message).toMatch(/not in the header/);
  });

  it('reads semicolon files with decimal commas', () => {
    const csv = 'Payload (mg);Gain;Surface;Apex (mm)\n1.200;10;ice;87,5\n1200,0;20;grass;90.25\n';
    const report = validateTrialImport(csv, { 'Payload (mg)': 'payload', Gain: 'gain', Surface: 'surface', 'Apex (mm)': 'response:apex' }, units, factors, responses);
    expect(report.valid).toBe(true);
    expect(report.rows[0]!.values.responses.apex).toBeCloseTo(0.0875, 12);
    expect(report.rows[0]!.values.factors.payload).toBeCloseTo(0.0012, 12);
    expect(report.rows[1]!.values.factors.payload).toBeCloseTo(1.2, 12);
    expect(report.rows[1]!.values.responses.apex).toBeCloseTo(0.09025, 12);
  });

  it('reports an empty file and a header without rows', () => {
    expect(validateTrialImport('', mapping, units, factors, responses).fileErrors[0]!.message).toMatch(/empty/);
    expect(validateTrialImport(`${header}\n`, mapping, units, factors, responses).fileErrors[0]!.message).toMatch(/no data rows/);
  });
});
