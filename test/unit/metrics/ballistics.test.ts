import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  STANDARD_GRAVITY, apexForFlightTime, apexForTakeoffSpeed, costOfTransport, flightTimeForApex, restitutionFromApexes,
  takeoffSpeedForApex, toJoules, toKilograms, toMetres, toSeconds, fromMetres, fromSeconds, lengthFactor,
} from '@/domain/metrics/ballistics';

describe('ballistic relations', () => {
  it('uses the standard gravity of ISO 80000-3', () => {
    expect(STANDARD_GRAVITY).toBe(9.80665);
  });

  // A 0.20 m apex needs 1.98 m/s vertical takeoff speed and about 0.40 s of flight (common practice, no source).
  it('a 0.20 m apex needs 1.98 m/s and about 0.40 s of flight', () => {
    expect(takeoffSpeedForApex(0.2)).toBeCloseTo(1.98, 2);
    expect(flightTimeForApex(0.2)).toBeCloseTo(0.40, 2);
    expect(apexForTakeoffSpeed(1.98)).toBeCloseTo(0.2, 3);
    expect(apexForFlightTime(flightTimeForApex(0.2))).toBeCloseTo(0.2, 12);
  });

  it('speed, apex and flight time are mutually consistent', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-4, max: 5, noNaN: true }), fc.double({ min: 1, max: 20, noNaN: true }), (h, g) => {
        const v = takeoffSpeedForApex(h, g);
        expect(apexForTakeoffSpeed(v, g)).toBeCloseTo(h, 10);
        // Flight time is twice the time to reach the apex, v / g.
        expect(flightTimeForApex(h, g)).toBeCloseTo((2 * v) / g, 10);
      }),
      { seed: 20260305 },
    );
  });

  it('refuses negative heights and non-positive gravity, naming the field', () => {
    expect(() => takeoffSpeedForApex(-0.1)).toThrow(/apexHeight/);
    expect(() => flightTimeForApex(0.1, 0)).toThrow(/gravity/);
    expect(() => apexForTakeoffSpeed(Number.NaN)).toThrow(/verticalSpeed/);
  });
});

describe('cost of transport', () => {
  it('is E / (m g d)', () => {
    // 1 g robot, 0.5 J over 2 m.
    expect(costOfTransport(0.5, 0.001, 2)).toBeCloseTo(0.5 / (0.001 * 9.80665 * 2), 12);
  });
  it('refuses zero distance and mass', () => {
    expect(() => costOfTransport(1, 0.001, 0)).toThrow(/distance/);
    expect(() => costOfTransport(1, 0, 1)).toThrow(/mass/);
    expect(() => costOfTransport(-1, 1, 1)).toThrow(/energy/);
  });
  it('restitution from two apexes', () => {
    expect(restitutionFromApexes(0.2, 0.05)).toBeCloseTo(0.5, 12);
  });
});

describe('units', () => {
  it('converts to SI and back', () => {
    expect(toMetres(250, 'mm')).toBeCloseTo(0.25, 15);
    expect(toMetres(25, 'cm')).toBeCloseTo(0.25, 15);
    expect(fromMetres(0.25, 'mm')).toBeCloseTo(250, 10);
    expect(toSeconds(400, 'ms')).toBeCloseTo(0.4, 15);
    expect(fromSeconds(0.4, 'ms')).toBeCloseTo(400, 10);
    expect(toKilograms(1.2, 'g')).toBeCloseTo(0.0012, 15);
    expect(toJoules(1, 'mWh')).toBeCloseTo(3.6, 12);
  });
  it('names the unit field for an unknown unit', () => {
    expect(() => lengthFactor('inch')).toThrow(/inch/);
    expect(() => toMetres(1, 'km' as never)).toThrow(/lengthUnit/);
  });
});
