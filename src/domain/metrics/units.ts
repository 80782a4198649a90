/**
 * Unit conversion between units of the same quantity, for values that arrive from spreadsheets and
 * instruments. Each unit is a scale to the SI unit of its quantity; temperatures are not handled
 * (they need an offset).
 */
import { invalidInput } from '@/domain/errors';

export type Quantity =
  | 'length' | 'mass' | 'time' | 'energy' | 'power' | 'voltage' | 'current' | 'charge'
  | 'speed' | 'acceleration' | 'frequency' | 'angle' | 'force' | 'ratio';

interface UnitDefinition {
  quantity: Quantity;
  /** SI units per this unit. */
  scale: number;
}

const UNITS: Record<string, UnitDefinition> = {
  m: { quantity: 'length', scale: 1 },
  cm: { quantity: 'length', scale: 1e-2 },
  mm: { quantity: 'length', scale: 1e-3 },
  um: { quantity: 'length', scale: 1e-6 },
  'µm': { quantity: 'length', scale: 1e-6 },
  kg: { quantity: 'mass', scale: 1 },
  g: { quantity: 'mass', scale: 1e-3 },
  mg: { quantity: 'mass', scale: 1e-6 },
  s: { quantity: 'time', scale: 1 },
  ms: { quantity: 'time', scale: 1e-3 },
  us: { quantity: 'time', scale: 1e-6 },
  'µs': { quantity: 'time', scale: 1e-6 },
  min: { quantity: 'time', scale: 60 },
  h: { quantity: 'time', scale: 3600 },
  J: { quantity: 'energy', scale: 1 },
  mJ: { quantity: 'energy', scale: 1e-3 },
  uJ: { quantity: 'energy', scale: 1e-6 },
  'µJ': { quantity: 'energy', scale: 1e-6 },
  Wh: { quantity: 'energy', scale: 3600 },
  mWh: { quantity: 'energy', scale: 3.6 },
  W: { quantity: 'power', scale: 1 },
  mW: { quantity: 'power', scale: 1e-3 },
  V: { quantity: 'voltage', scale: 1 },
  mV: { quantity: 'voltage', scale: 1e-3 },
  A: { quantity: 'current', scale: 1 },
  mA: { quantity: 'current', scale: 1e-3 },
  uA: { quantity: 'current', scale: 1e-6 },
  'µA': { quantity: 'current', scale: 1e-6 },
  C: { quantity: 'charge', scale: 1 },
  mAh: { quantity: 'charge', scale: 3.6 },
  Ah: { quantity: 'charge', scale: 3600 },
  'm/s': { quantity: 'speed', scale: 1 },
  'cm/s': { quantity: 'speed', scale: 1e-2 },
  'mm/s': { quantity: 'speed', scale: 1e-3 },
  'm/s2': { quantity: 'acceleration', scale: 1 },
  'm/s²': { quantity: 'acceleration', scale: 1 },
  Hz: { quantity: 'frequency', scale: 1 },
  kHz: { quantity: 'frequency', scale: 1e3 },
  rad: { quantity: 'angle', scale: 1 },
  deg: { quantity: 'angle', scale: Math.PI / 180 },
  '°': { quantity: 'angle', scale: Math.PI / 180 },
  N: { quantity: 'force', scale: 1 },
  mN: { quantity: 'force', scale: 1e-3 },
  '1': { quantity: 'ratio', scale: 1 },
  '%': { quantity: 'ratio', scale: 1e-2 },
};

/** The quantity and SI scale of a unit symbol, or undefined when the symbol is not known. */
export function unitDefinition(unit: string): UnitDefinition | undefined {
  return Object.prototype.hasOwnProperty.call(UNITS, unit.trim()) ? UNITS[unit.trim()] : undefined;
}

/** Units known for conversion. */
export function knownUnits(): string[] {
  return Object.keys(UNITS);
}

/**
 * Multiplier taking a value in `from` to `to`. Equal symbols need no table entry. Throws a DomainError
 * naming `field` when a symbol is unknown or the quantities differ.
 */
export function conversionFactor(from: string, to: string, field = 'unit'): number {
  if (from.trim() === to.trim()) return 1;
  const a = unitDefinition(from);
  const b = unitDefinition(to);
  if (!a) throw invalidInput(field, `${field}: unknown unit '${from}'; use one of ${knownUnits().join(', ')}`);
  if (!b) throw invalidInput(field, `${field}: cannot convert to '${to}', a unit not in the conversion table; give the values in '${to}'`);
  if (a.quantity !== b.quantity) throw invalidInput(field, `${field}: '${from}' is a ${a.quantity} and '${to}' a ${b.quantity}; they cannot be converted`);
  return a.scale / b.scale;
}

/** Convert `value` from unit `from` to unit `to`. */
export function convertUnit(value: number, from: string, to: string, field = 'unit'): number {
  return value * conversionFactor(from, to, field);
}
