/**
 * Plausibility checks for the readings an operator logs at the rig. Pure: "now" comes in as an
 * argument. Errors refuse the entry; warnings ask the operator to look again. Each message names the
 * field and says how to fix it.
 */
import { STANDARD_GRAVITY, flightTimeForApex } from './ballistics';

export interface TrialReadings {
  apexHeightM?: number | null;
  hopsCompleted?: number | null;
  distanceM?: number | null;
  energyJ?: number | null;
  passed?: boolean | null;
  failureReason?: string | null;
  /** ISO 8601 date-time. */
  startedAt?: string | null;
  /** ISO 8601 date-time. */
  finishedAt?: string | null;
}

export interface ReadingsContext {
  /** The current time, ISO 8601 (passed in so that the check is pure). */
  now: string;
  robotHeightM?: number | null;
  robotMassKg?: number | null;
  /** Clock difference between tablet and server tolerated before a time counts as future, s (default 120). */
  clockToleranceS?: number;
  /**
   * How the operator sees each reading: its name and unit, and the multiplier from that unit to SI.
   * Messages then quote the value as entered; without it they use the SI field names.
   */
  labels?: Partial<Record<keyof TrialReadings, { name: string; unit: string; toSi: number }>>;
}

export interface ReadingIssue {
  field: keyof TrialReadings;
  message: string;
}

export interface ReadingsCheck {
  errors: ReadingIssue[];
  warnings: ReadingIssue[];
}

/** Apex above this is refused: a gram-scale hopper does not reach several metres (common practice, no source). */
export const APEX_REFUSE_M = 3;
/** Apex above this is questioned (common practice, no source). */
export const APEX_WARN_M = 1;
/** Apex above this many body heights is questioned (common practice, no source). */
export const APEX_WARN_BODY_HEIGHTS = 30;
/** A trial longer than this is questioned, s (common practice, no source). */
export const LONG_TRIAL_S = 4 * 3600;

function present<T>(v: T | null | undefined): v is T {
  return v !== undefined && v !== null;
}

function parseTime(value: string): number {
  // Require a date and a time; Date.parse alone would accept loose strings.
  if (!/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/.test(value)) return Number.NaN;
  return Date.parse(value);
}

/** Check one set of readings; see the module comment. */
export function checkReadings(readings: TrialReadings, context: ReadingsContext): ReadingsCheck {
  const errors: ReadingIssue[] = [];
  const warnings: ReadingIssue[] = [];
  const refuse = (field: keyof TrialReadings, message: string) => errors.push({ field, message });
  const warn = (field: keyof TrialReadings, message: string) => warnings.push({ field, message });

  const label = (field: keyof TrialReadings, si: string) => context.labels?.[field] ?? { name: field, unit: si, toSi: 1 };
  /** A value in the unit the operator entered it in: "3500 mm". */
  const valueIn = (field: keyof TrialReadings, value: number, si: string) => {
    const l = label(field, si);
    return `${Number((value / (l.toSi || 1)).toPrecision(6))}${l.unit ? ` ${l.unit}` : ''}`;
  };
  /** A value as the operator entered it: "apex_height of 3500 mm". */
  const said = (field: keyof TrialReadings, value: number, si: string) => `${label(field, si).name} of ${valueIn(field, value, si)}`;
  /** A limit in SI converted to the unit of the field, when that differs: "3 m (3000 mm)". */
  const limit = (field: keyof TrialReadings, value: number, si: string) => {
    const l = label(field, si);
    return l.unit === si || !l.toSi ? `${value} ${si}` : `${value} ${si} (${Number((value / l.toSi).toPrecision(6))} ${l.unit})`;
  };

  const finiteOrRefuse = (field: keyof TrialReadings, v: number | null | undefined, unit: string): v is number => {
    if (!present(v)) return false;
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      const l = label(field, unit);
      refuse(field, `${l.name} is not a number; enter the value in ${l.unit || unit} or leave it empty`);
      return false;
    }
    return true;
  };

  // Apex height.
  const apex = readings.apexHeightM;
  if (finiteOrRefuse('apexHeightM', apex, 'm')) {
    const unit = label('apexHeightM', 'm').unit;
    if (apex < 0) refuse('apexHeightM', `${said('apexHeightM', apex, 'm')} is negative; enter the height above the takeoff surface, ≥ 0`);
    else if (apex > APEX_REFUSE_M) {
      refuse('apexHeightM', `${said('apexHeightM', apex, 'm')} is beyond ${limit('apexHeightM', APEX_REFUSE_M, 'm')}; check the unit (this field is in ${unit}${unit === 'mm' ? ', e.g. 250 for 25 cm' : unit === 'm' ? ', e.g. 0.25 for 25 cm' : ''})`);
    } else {
      if (apex > APEX_WARN_M) {
        warn('apexHeightM', `${said('apexHeightM', apex, 'm')} is above ${limit('apexHeightM', APEX_WARN_M, 'm')}, unusual for a gram-scale hopper (common practice, no source); confirm it is in ${unit}`);
      }
      const body = context.robotHeightM;
      if (present(body) && Number.isFinite(body) && body > 0 && apex > APEX_WARN_BODY_HEIGHTS * body) {
        warn('apexHeightM', `${said('apexHeightM', apex, 'm')} is ${(apex / body).toFixed(0)} body heights, above ${APEX_WARN_BODY_HEIGHTS} (common practice, no source); confirm the value and its unit`);
      }
    }
  }

  // Hops completed.
  const hops = readings.hopsCompleted;
  const hopsName = label('hopsCompleted', '').name;
  if (finiteOrRefuse('hopsCompleted', hops, 'hops')) {
    if (hops < 0 || !Number.isInteger(hops)) refuse('hopsCompleted', `${hopsName} must be a whole number ≥ 0; got ${hops}`);
    else if (hops === 0 && present(apex) && Number.isFinite(apex) && apex > 0) {
      warn('hopsCompleted', `${hopsName} is 0 but an apex height is entered; enter the number of hops or clear the apex`);
    }
  }

  // Distance travelled.
  const distance = readings.distanceM;
  if (finiteOrRefuse('distanceM', distance, 'm')) {
    if (distance < 0) refuse('distanceM', `${said('distanceM', distance, 'm')} is negative; enter the distance travelled as a length ≥ 0`);
    else if (distance > 100) warn('distanceM', `${said('distanceM', distance, 'm')} is above ${limit('distanceM', 100, 'm')}, long for one trial; confirm it is in ${label('distanceM', 'm').unit}`);
  }

  // Electrical energy drawn.
  const energy = readings.energyJ;
  if (finiteOrRefuse('energyJ', energy, 'J')) {
    const unit = label('energyJ', 'J').unit;
    if (energy < 0) refuse('energyJ', `${said('energyJ', energy, 'J')} is negative; enter the electrical energy drawn, ≥ 0 (check the sign of the current probe)`);
    else {
      const mass = context.robotMassKg;
      if (present(mass) && mass > 0 && present(apex) && Number.isFinite(apex) && apex >= 0 && apex <= APEX_REFUSE_M &&
          present(hops) && Number.isInteger(hops) && hops > 0) {
        // The electrical energy cannot be below the potential energy gained in the hops.
        const lifted = mass * STANDARD_GRAVITY * apex * hops;
        if (energy < lifted) {
          warn('energyJ', `${said('energyJ', energy, 'J')} is below the ${limit('energyJ', Number(lifted.toPrecision(3)), 'J')} needed to lift the robot to the apex ${hops} time(s); check the unit (this field is in ${unit})`);
        }
      }
    }
  }

  // Pass / fail.
  const reason = readings.failureReason?.trim() ?? '';
  if (readings.passed === false && reason === '') refuse('failureReason', 'the trial failed but no failure reason is given; choose or type a reason');
  if (readings.passed === true && reason !== '') warn('failureReason', 'the trial is marked passed but has a failure reason; clear the reason or mark it failed');

  // Times.
  const now = parseTime(context.now);
  const tolerance = (context.clockToleranceS ?? 120) * 1000;
  const times: Partial<Record<'startedAt' | 'finishedAt', number>> = {};
  for (const field of ['startedAt', 'finishedAt'] as const) {
    const v = readings[field];
    if (!present(v) || v === '') continue;
    const t = parseTime(v);
    if (!Number.isFinite(t)) {
      refuse(field, `${field} '${v}' is not a date and time; use ISO 8601, e.g. 2026-03-01T14:05:00Z`);
      continue;
    }
    times[field] = t;
    if (Number.isFinite(now) && t > now + tolerance) {
      refuse(field, `${field} is in the future (${v}); check the tablet's clock and time zone`);
    }
  }
  if (times.startedAt !== undefined && times.finishedAt !== undefined) {
    const span = times.finishedAt - times.startedAt;
    if (span < 0) refuse('finishedAt', 'finishedAt is before startedAt; swap them or correct the finish time');
    else if (span > LONG_TRIAL_S * 1000) warn('finishedAt', `the trial lasted ${(span / 3600000).toFixed(1)} h; confirm the finish time (a trial left open?)`);
    else if (present(hops) && Number.isInteger(hops) && hops > 0 && present(apex) && Number.isFinite(apex) && apex > 0 && apex <= APEX_REFUSE_M) {
      // Each hop to the apex is airborne for 2·sqrt(2h/g); the hops cannot need more time than the trial took.
      // Only a warning: start and finish are button presses, and a start pressed late shortens the span.
      const airborne = hops * flightTimeForApex(apex);
      if (airborne > span / 1000) {
        const fit = Math.floor(span / 1000 / flightTimeForApex(apex));
        warn('hopsCompleted', `${hopsName}: ${hops} hops to ${valueIn('apexHeightM', apex, 'm')} take at least ${airborne.toFixed(1)} s in the air, but the trial lasted ${(span / 1000).toFixed(1)} s from start to finish (at most ${fit} such hops); check the count and the apex unit, or the start time if the trial was started late`);
      }
    }
  }

  return { errors, warnings };
}
