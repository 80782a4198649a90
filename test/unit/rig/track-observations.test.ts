/** Which responses a motion track feeds, and in which unit (src/server/repos/track-observations.ts). */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { ResponseDefinition } from '@/domain/factors';
import type { TrackSummary } from '@/domain/tracks';
import { derivedObservations } from '@/server/repos/track-observations';

/** A summary with the fields the mapping reads (the rest of TrackSummary is not used here). */
function summary(over: Partial<TrackSummary> = {}): TrackSummary {
  const base: Partial<TrackSummary> = {
    hopCount: 3, sampleCount: 1000, duration: 1.5, medianSamplingInterval: 0.001, gapCount: 0, longestGap: 0.001,
    groundLevel: 0, noiseSigma: 0.0001, flightThreshold: 0.002, meanApexHeight: 0.2, maxApexHeight: 0.21,
    meanHopLength: 0.2, meanFlightTime: 0.404, meanStanceTime: 0.1, meanTakeoffSpeed: 2.04, meanTakeoffAngleDeg: 76,
    meanHorizontalSpeed: 0.4, totalDistance: 0.6, meanFittedGravity: 9.8, meanRestitution: 1, meanLandingError: null,
    energyPerHop: 0.002, costOfTransport: 0.34,
  };
  return { ...base, ...over } as TrackSummary;
}

const response = (name: string, unit?: string): ResponseDefinition => ({ name, unit, goal: 'maximize' }) as ResponseDefinition;

describe('track metrics → responses', () => {
  it('maps names to metrics and converts to the response unit', () => {
    const out = derivedObservations(summary(), [
      response('apex_height', 'mm'),
      response('hop_length', 'cm'),
      response('distance_travelled', 'm'),
      response('energy_per_hop', 'mJ'),
      response('cost_of_transport'),
      response('hops_completed'),
      response('flight_time', 'ms'),
      response('battery_voltage', 'V'),
    ]);
    const byName = Object.fromEntries(out.map((o) => [o.name, o]));
    expect(byName.apex_height!.value).toBeCloseTo(200, 9);
    expect(byName.hop_length!.value).toBeCloseTo(20, 9);
    expect(byName.distance_travelled!.value).toBeCloseTo(0.6, 12);
    expect(byName.energy_per_hop!.value).toBeCloseTo(2, 9);
    expect(byName.cost_of_transport!).toMatchObject({ value: 0.34, metric: 'costOfTransport' });
    expect(byName.hops_completed!).toMatchObject({ value: 3, metric: 'hopCount' });
    expect(byName.flight_time!.value).toBeCloseTo(404, 9);
    expect(byName.battery_voltage).toBeUndefined();
  });

  it('leaves out a response whose unit is of another quantity, and a metric the track could not give', () => {
    expect(derivedObservations(summary(), [response('apex_height', 'mJ')])).toEqual([]);
    expect(derivedObservations(summary({ costOfTransport: null }), [response('cost_of_transport')])).toEqual([]);
  });

  it('gives the same length in m, cm and mm up to the unit factor (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 3, noNaN: true }), (apex) => {
        const [m, cm, mm] = (['m', 'cm', 'mm'] as const).map((u) => derivedObservations(summary({ meanApexHeight: apex }), [response('apex', u)])[0]!.value);
        expect(cm).toBeCloseTo(m! * 100, 9);
        expect(mm).toBeCloseTo(m! * 1000, 9);
      }),
    );
  });
});
