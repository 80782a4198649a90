import { describe, expect, it } from 'vitest';
import type { Factor, ResponseDefinition } from '@/domain/factors';
import { readingTargets, trialsToStore, validateTrialImport } from '@/domain/import/trials';

// An invented campaign: one factor; a response of its own that stands for no standard reading.
const factors: Factor[] = [{ name: 'payload', kind: 'continuous', low: 0, high: 2, unit: 'g' }];
const ownResponse: ResponseDefinition[] = [{ name: 'landing_score', unit: '', goal: 'maximize' }];
// The same campaign where a response "apex" in cm stands for the apex-height reading.
const apexResponse: ResponseDefinition[] = [
  { name: 'apex', unit: 'cm', goal: 'maximize' },
  { name: 'landing_score', unit: '', goal: 'maximize' },
];
const NOW = { now: '2026-03-02T12:00:00Z' };

const header = 'payload,Apex (cm),Hops,Distance,Energy (J),ok,why,start,end';
const mapping = {
  payload: 'payload',
  'Apex (cm)': 'apex_height',
  Hops: 'hops_completed',
  Distance: 'reading:distance_travelled',
  'Energy (J)': 'energy_drawn',
  ok: 'passed',
  why: 'failureReason',
  start: 'startedAt',
  end: 'finishedAt',
};
const units = { 'Apex (cm)': 'cm', 'Energy (J)': 'J' };
const times = '2026-03-01T10:00:00Z,2026-03-01T10:02:00Z';

describe('past-trial import of the standard rig readings: mapping and units', () => {
  it('maps columns to readings by their standard names and converts to mm, mJ and counts', () => {
    const csv = `${header}\n0.5,18,3,420,0.95,yes,,${times}\n1.0,,,,,no,fell: tipped on landing,${times}\n`;
    const report = validateTrialImport(csv, mapping, units, factors, ownResponse, NOW);
    expect(report.fileErrors).toEqual([]);
    expect(report.valid).toBe(true);
    const [a, b] = report.rows;
    expect(a!.values.readings.apex_height).toBe(180);
    expect(a!.values.readings.hops_completed).toBe(3);
    expect(a!.values.readings.distance_travelled).toBe(420);
    expect(a!.values.readings.energy_drawn).toBeCloseTo(950, 9);
    expect(a!.values.responses).toEqual({});
    // Blank cells are no reading (nothing is stored for them).
    expect(b!.values.readings).toEqual({ apex_height: null, hops_completed: null, distance_travelled: null, energy_drawn: null });
    expect(b!.values.failureReason).toBe('fell: tipped on landing');
    expect(trialsToStore(report)).toHaveLength(2);
  });

  it('treats a response that stands for a reading as that reading: one field, stored under the response', () => {
    const csv = `payload,Apex (cm)\n0.5,18\n`;
    for (const target of ['apex_height', 'reading:apex_height', 'apex', 'response:apex']) {
      const report = validateTrialImport(csv, { payload: 'payload', 'Apex (cm)': target }, { 'Apex (cm)': 'cm' }, factors, apexResponse, NOW);
      expect(report.valid, target).toBe(true);
      expect(report.rows[0]!.values.responses, target).toEqual({ apex: 18 });
      expect(report.rows[0]!.values.readings, target).toEqual({});
    }
    // Both names in one file are the same field twice.
    const twice = validateTrialImport('payload,a,b\n0.5,18,180\n', { payload: 'payload', a: 'response:apex', b: 'reading:apex_height' }, { b: 'mm' }, factors, apexResponse, NOW);
    expect(twice.fileErrors.map((e) => e.message)).toEqual(["columns 'a' and 'b' are both mapped to response:apex; map one of them"]);
    // A column in mm converts to the response's cm.
    const mm = validateTrialImport('payload,a\n0.5,180\n', { payload: 'payload', a: 'apex_height' }, { a: 'mm' }, factors, apexResponse, NOW);
    expect(mm.rows[0]!.values.responses.apex).toBeCloseTo(18, 12);
  });

  it('offers the readings as mapping targets, naming where each is stored', () => {
    expect(readingTargets(apexResponse)).toEqual([
      { reading: 'apex_height', label: 'Apex height', name: 'apex', unit: 'cm', response: true },
      { reading: 'hops_completed', label: 'Hops completed', name: 'hops_completed', unit: 'count', response: false },
      { reading: 'distance_travelled', label: 'Distance travelled', name: 'distance_travelled', unit: 'mm', response: false },
      { reading: 'energy_drawn', label: 'Electrical energy drawn', name: 'energy_drawn', unit: 'mJ', response: false },
    ]);
  });

  it('accepts a file that maps only readings, though the campaign declares responses', () => {
    const report = validateTrialImport('payload,Hops\n0.5,4\n', { payload: 'payload', Hops: 'hops_completed' }, {}, factors, ownResponse, NOW);
    expect(report.fileErrors).toEqual([]);
    expect(report.rows[0]!.values.readings).toEqual({ hops_completed: 4 });
  });

  it('refuses a unit of the wrong quantity naming the column and the units it accepts', () => {
    const csv = `${header}\n0.5,18,3,420,0.95,yes,,${times}\n`;
    const energyInApex = validateTrialImport(csv, mapping, { ...units, 'Apex (cm)': 'mWh' }, factors, ownResponse, NOW);
    expect(energyInApex.valid).toBe(false);
    expect(energyInApex.fileErrors[0]!.column).toBe('Apex (cm)');
    expect(energyInApex.fileErrors[0]!.message).toMatch(/column 'Apex \(cm\)' holds apex_height .*stored in mm.*'mWh' is an energy unit, not a length; use one of m, cm, mm, um, µm/);
    const unknown = validateTrialImport(csv, mapping, { ...units, 'Energy (J)': 'kcal' }, factors, ownResponse, NOW);
    expect(unknown.fileErrors[0]!.message).toMatch(/'kcal' is not a known unit; use one of J, mJ, uJ, µJ, Wh, mWh, or leave the unit empty when the numbers are in mJ/);
    const hopsInMm = validateTrialImport(csv, mapping, { ...units, Hops: 'mm' }, factors, ownResponse, NOW);
    expect(hopsInMm.fileErrors[0]!.column).toBe('Hops');
    expect(hopsInMm.fileErrors[0]!.message).toMatch(/holds hops_completed, a count, and takes no unit; leave its unit empty \(or write count, 1, hops, hop, n\) instead of 'mm'/);
    expect(validateTrialImport(csv, mapping, { ...units, Hops: 'hops' }, factors, ownResponse, NOW).valid).toBe(true);
  });
});

describe('past-trial import of the standard rig readings: the rig plausibility check', () => {
  const row = (cells: string) => validateTrialImport(`${header}\n${cells}\n`, mapping, units, factors, ownResponse, { ...NOW, robots: [{ name: 'Hopper A', massGrams: 2, heightMm: 10 }] });
  const mappingWithRobot = { ...mapping, robot: 'robot' };

  it('refuses an apex of several metres, quoting the column and its unit, on the row with its line', () => {
    const report = validateTrialImport(`${header}\n0.5,18,3,420,0.95,yes,,${times}\n0.5,450,3,420,0.95,yes,,${times}\n`, mapping, units, factors, ownResponse, NOW);
    expect(report.valid).toBe(false);
    const bad = report.rows[1]!;
    expect(bad.line).toBe(3);
    expect(bad.errors).toEqual([
      { column: 'Apex (cm)', field: 'apex_height', message: 'Apex (cm) of 450 cm is beyond 3 m (300 cm); check the unit (this field is in cm)' },
    ]);
    expect(report.rows[0]!.errors).toEqual([]);
  });

  it('refuses hops that are not a whole number ≥ 0 and negative lengths and energies', () => {
    expect(row(`0.5,18,2.5,420,0.95,yes,,${times}`).rows[0]!.errors).toEqual([{ column: 'Hops', field: 'hops_completed', message: 'Hops must be a whole number ≥ 0; got 2.5' }]);
    expect(row(`0.5,18,-1,420,0.95,yes,,${times}`).rows[0]!.errors[0]!.message).toMatch(/Hops must be a whole number ≥ 0; got -1/);
    const negative = row(`0.5,18,3,-4,-0.2,yes,,${times}`).rows[0]!.errors;
    expect(negative.map((e) => e.column)).toEqual(['Distance', 'Energy (J)']);
    expect(negative[1]!.message).toMatch(/Energy \(J\) of -0\.2 J is negative/);
    expect(row(`0.5,18,three,420,0.95,yes,,${times}`).rows[0]!.errors).toEqual([{ column: 'Hops', field: 'hops_completed', message: "'three' is not a number; enter hops_completed or leave the cell blank" }]);
  });

  it('asks to look again where the rig would: more hops than fit in the trial, too little energy for the robot', () => {
    // 2 min trial; hops to 0.18 m are about 0.38 s in the air each (common practice, no source).
    const hops = row(`0.5,18,700,420,0.95,yes,,${times}`).rows[0]!;
    expect(hops.errors).toEqual([]);
    expect(hops.warnings.map((w) => [w.column, w.field])).toEqual([['Hops', 'hops_completed']]);
    expect(hops.warnings[0]!.message).toMatch(/700 hops to 18 cm take at least/);
    const csv = `${header},robot\n0.5,18,3,420,0.001,yes,,${times},hopper a\n`;
    const energy = validateTrialImport(csv, mappingWithRobot, units, factors, ownResponse, { ...NOW, robots: [{ name: 'Hopper A', massGrams: 2, heightMm: 10 }] }).rows[0]!;
    expect(energy.errors).toEqual([]);
    expect(energy.warnings.map((w) => w.column)).toEqual(['Energy (J)']);
    expect(energy.warnings[0]!.message).toMatch(/Energy \(J\) of 0\.001 J is below the 0\.0106 J needed to lift the robot/);
  });

  it('refuses a finish before the start, naming the finish column', () => {
    const report = row('0.5,18,3,420,0.95,yes,,2026-03-01T10:02:00Z,2026-03-01T10:00:00Z');
    expect(report.rows[0]!.errors).toEqual([{ column: 'end', field: 'finishedAt', message: 'finishedAt is before startedAt; swap them or correct the finish time' }]);
  });

  it('takes failure reasons only of the known kinds, stored as the rig page stores them', () => {
    const reason = (cell: string, ok = 'no') => row(`0.5,18,3,420,0.95,${ok},${cell},${times}`).rows[0]!;
    expect(reason('fell').values.failureReason).toBe('fell');
    expect(reason('Broke: leg snapped').values.failureReason).toBe('broke: leg snapped');
    expect(reason('stalled:').values.failureReason).toBe('stalled');
    expect(reason('other: slipped on ice').values.failureReason).toBe('slipped on ice');
    const free = reason('slipped');
    expect(free.errors).toEqual([{ column: 'why', field: 'failureReason', message: "'slipped' is not a failure reason; write fell, broke, stalled (optionally followed by ': words', e.g. 'fell: tipped on landing') or 'other: words'" }]);
    expect(reason('other').errors[0]!.message).toMatch(/gives no words; write 'other: ' followed by what happened/);
    const passed = reason('fell', 'yes');
    expect(passed.errors).toEqual([{ column: 'why', field: 'failureReason', message: "the trial is marked passed but has the failure reason 'fell'; clear the reason or mark the trial failed" }]);
    // A failed past trial with no reason recorded stays importable, with a warning.
    const none = reason('', 'no');
    expect(none.errors).toEqual([]);
    expect(none.warnings).toEqual([{ column: 'ok', field: 'failureReason', message: 'the trial failed but no failure reason is given' }]);
  });
});
