/**
 * Ballistic relations for a hop, energy figures and unit helpers. SI units throughout: metres,
 * seconds, kilograms, joules. Drag is neglected (a point mass in a uniform field).
 */
import { invalidInput } from '@/domain/errors';

/** Standard acceleration of gravity, m/s² (ISO 80000-3, exact by definition). */
export const STANDARD_GRAVITY = 9.80665;

function requireNonNegative(field: string, value: number): void {
  if (!Number.isFinite(value) || value < 0) throw invalidInput(field, `${field} must be a finite number ≥ 0; got ${value}`);
}

function requirePositive(field: string, value: number): void {
  if (!Number.isFinite(value) || value <= 0) throw invalidInput(field, `${field} must be a finite number > 0; got ${value}`);
}

/** Vertical takeoff speed (m/s) that reaches an apex `apexHeight` metres above takeoff: v = √(2 g h). */
export function takeoffSpeedForApex(apexHeight: number, gravity = STANDARD_GRAVITY): number {
  requireNonNegative('apexHeight', apexHeight);
  requirePositive('gravity', gravity);
  return Math.sqrt(2 * gravity * apexHeight);
}

/** Flight time (s) of a hop whose apex is `apexHeight` metres above equal takeoff and landing levels: T = 2 √(2 h / g). */
export function flightTimeForApex(apexHeight: number, gravity = STANDARD_GRAVITY): number {
  requireNonNegative('apexHeight', apexHeight);
  requirePositive('gravity', gravity);
  return 2 * Math.sqrt((2 * apexHeight) / gravity);
}

/** Apex height (m) above takeoff reached with vertical takeoff speed `verticalSpeed` (m/s): h = v² / (2 g). */
export function apexForTakeoffSpeed(verticalSpeed: number, gravity = STANDARD_GRAVITY): number {
  if (!Number.isFinite(verticalSpeed)) throw invalidInput('verticalSpeed', `verticalSpeed must be a finite number; got ${verticalSpeed}`);
  requirePositive('gravity', gravity);
  return (verticalSpeed * verticalSpeed) / (2 * gravity);
}

/** Apex height (m) of a hop with flight time `flightTime` (s) between equal levels: h = g T² / 8. */
export function apexForFlightTime(flightTime: number, gravity = STANDARD_GRAVITY): number {
  requireNonNegative('flightTime', flightTime);
  requirePositive('gravity', gravity);
  return (gravity * flightTime * flightTime) / 8;
}

/**
 * Dimensionless cost of transport E / (m g d): energy `energy` (J) spent moving mass `mass` (kg) over
 * horizontal distance `distance` (m). Tucker (1975), American Scientist 63:413-419 (citation from memory).
 */
export function costOfTransport(energy: number, mass: number, distance: number, gravity = STANDARD_GRAVITY): number {
  requireNonNegative('energy', energy);
  requirePositive('mass', mass);
  requirePositive('distance', distance);
  requirePositive('gravity', gravity);
  return energy / (mass * gravity * distance);
}

/** Effective coefficient of restitution from two successive apex heights: e = √(h₂ / h₁) (common practice, no source). */
export function restitutionFromApexes(previousApex: number, nextApex: number): number {
  requirePositive('previousApex', previousApex);
  requireNonNegative('nextApex', nextApex);
  return Math.sqrt(nextApex / previousApex);
}

// ---------------------------------------------------------------------------------------------
// Units. Values enter the domain in SI; these helpers convert at the edges.

export type LengthUnit = 'm' | 'cm' | 'mm';
export type TimeUnit = 's' | 'ms' | 'us';
export type MassUnit = 'kg' | 'g' | 'mg';
export type EnergyUnit = 'J' | 'mJ' | 'Wh' | 'mWh';

/** Metres per unit. */
export const LENGTH_TO_METRES: Readonly<Record<LengthUnit, number>> = { m: 1, cm: 0.01, mm: 0.001 };
/** Seconds per unit. */
export const TIME_TO_SECONDS: Readonly<Record<TimeUnit, number>> = { s: 1, ms: 0.001, us: 1e-6 };
/** Kilograms per unit. */
export const MASS_TO_KILOGRAMS: Readonly<Record<MassUnit, number>> = { kg: 1, g: 0.001, mg: 1e-6 };
/** Joules per unit (1 Wh = 3600 J). */
export const ENERGY_TO_JOULES: Readonly<Record<EnergyUnit, number>> = { J: 1, mJ: 0.001, Wh: 3600, mWh: 3.6 };

function factorFor<U extends string>(table: Readonly<Record<U, number>>, unit: string, field: string): number {
  const f = (table as Record<string, number>)[unit];
  if (f === undefined) throw invalidInput(field, `${field}: unknown unit '${unit}'; use one of ${Object.keys(table).join(', ')}`);
  return f;
}

export function toMetres(value: number, unit: LengthUnit): number {
  return value * factorFor(LENGTH_TO_METRES, unit, 'lengthUnit');
}
export function fromMetres(metres: number, unit: LengthUnit): number {
  return metres / factorFor(LENGTH_TO_METRES, unit, 'lengthUnit');
}
export function toSeconds(value: number, unit: TimeUnit): number {
  return value * factorFor(TIME_TO_SECONDS, unit, 'timeUnit');
}
export function fromSeconds(seconds: number, unit: TimeUnit): number {
  return seconds / factorFor(TIME_TO_SECONDS, unit, 'timeUnit');
}
export function toKilograms(value: number, unit: MassUnit): number {
  return value * factorFor(MASS_TO_KILOGRAMS, unit, 'massUnit');
}
export function toJoules(value: number, unit: EnergyUnit): number {
  return value * factorFor(ENERGY_TO_JOULES, unit, 'energyUnit');
}
/** Scale factor to SI for a length unit name; throws a DomainError naming `field` for an unknown unit. */
export function lengthFactor(unit: string, field = 'lengthUnit'): number {
  return factorFor(LENGTH_TO_METRES, unit, field);
}
/** Scale factor to SI for a time unit name; throws a DomainError naming `field` for an unknown unit. */
export function timeFactor(unit: string, field = 'timeUnit'): number {
  return factorFor(TIME_TO_SECONDS, unit, field);
}

export function degrees(radians: number): number {
  return (radians * 180) / Math.PI;
}
