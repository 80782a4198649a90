/**
 * Which track metric feeds which response: a response whose name reads like a track metric (apex,
 * hop length, distance, energy per hop, cost of transport, flight time, ...) gets the track's summary
 * value converted to the response's unit. Pure; used when a track is stored.
 */
import type { ResponseDefinition } from '@/domain/factors';
import { unitDefinition } from '@/domain/metrics/units';
import type { TrackSummary } from '@/domain/tracks';

/** A track metric that can feed a response: which summary value, its SI unit, and names that mean it. */
export interface DerivedMetric {
  key: keyof TrackSummary;
  siUnit: string;
  pattern: RegExp;
}

/** Checked in order; the first whose pattern matches a response name feeds it. */
export const DERIVED: DerivedMetric[] = [
  { key: 'costOfTransport', siUnit: '1', pattern: /cost.?of.?transport|^cot$/i },
  { key: 'energyPerHop', siUnit: 'J', pattern: /energy.?per.?hop/i },
  { key: 'meanApexHeight', siUnit: 'm', pattern: /apex|hop.?height|jump.?height/i },
  { key: 'meanHopLength', siUnit: 'm', pattern: /hop.?length|jump.?length|stride/i },
  { key: 'totalDistance', siUnit: 'm', pattern: /distance|travel/i },
  { key: 'hopCount', siUnit: '1', pattern: /^hops?(_?count|_?completed)?$|hops.?completed|number.?of.?hops/i },
  { key: 'meanFlightTime', siUnit: 's', pattern: /flight.?time/i },
  { key: 'meanStanceTime', siUnit: 's', pattern: /stance.?time|contact.?time/i },
  { key: 'meanTakeoffSpeed', siUnit: 'm/s', pattern: /takeoff.?speed|take.?off.?speed/i },
  { key: 'meanTakeoffAngleDeg', siUnit: 'deg', pattern: /takeoff.?angle|take.?off.?angle/i },
  { key: 'meanHorizontalSpeed', siUnit: 'm/s', pattern: /horizontal.?speed|forward.?speed/i },
  { key: 'meanRestitution', siUnit: '1', pattern: /restitution/i },
  { key: 'meanLandingError', siUnit: 'm', pattern: /landing.?error|miss.?distance/i },
];

export interface DerivedObservation {
  name: string;
  value: number;
  unit: string;
  /** The summary metric it came from. */
  metric: keyof TrackSummary;
}

/**
 * Responses whose names match a track metric, with the metric converted to the response's unit.
 * Responses with a unit of another quantity (or an unknown unit) are left out; no unit means SI.
 */
export function derivedObservations(summary: TrackSummary, responses: readonly ResponseDefinition[]): DerivedObservation[] {
  const out: DerivedObservation[] = [];
  for (const r of responses) {
    const metric = DERIVED.find((d) => d.pattern.test(r.name));
    if (!metric) continue;
    const si = summary[metric.key];
    if (typeof si !== 'number' || !Number.isFinite(si)) continue;
    const unit = (r.unit ?? '').trim();
    let scale = 1;
    if (unit !== '' && unit !== metric.siUnit) {
      const from = unitDefinition(metric.siUnit);
      const to = unitDefinition(unit);
      if (!from || !to || from.quantity !== to.quantity) continue;
      scale = from.scale / to.scale;
    }
    out.push({ name: r.name, value: si * scale, unit, metric: metric.key });
  }
  return out;
}

