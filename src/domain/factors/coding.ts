/**
 * Natural ↔ coded units, in one place. Numeric factors map [low, high] onto [-1, 1]; a categorical
 * factor's level is coded by its index, and expands into effect-coded (sum-to-zero) columns in a
 * model matrix.
 */
import { invalidInput } from '../errors';
import type { Factor, FactorValue, NumericFactor, Point } from './types';

export function numericRange(f: NumericFactor): { low: number; high: number } {
  if (f.kind === 'continuous') return { low: f.low, high: f.high };
  return { low: Math.min(...f.values), high: Math.max(...f.values) };
}

/** Natural value of a numeric factor → coded value in [-1, 1]. */
export function toCoded(f: NumericFactor, natural: number): number {
  const { low, high } = numericRange(f);
  return (2 * (natural - low)) / (high - low) - 1;
}

/** Coded value in [-1, 1] (or beyond, for axial points) → natural value. */
export function toNatural(f: NumericFactor, coded: number): number {
  const { low, high } = numericRange(f);
  return low + ((coded + 1) * (high - low)) / 2;
}

/** Index of a categorical level; throws a field-named error for an unknown level. */
export function levelIndex(f: Factor & { kind: 'categorical' }, value: FactorValue): number {
  const i = f.levels.indexOf(String(value));
  if (i < 0) {
    throw invalidInput(f.name, `"${String(value)}" is not a level of ${f.name}; use one of: ${f.levels.join(', ')}`);
  }
  return i;
}

/** Nearest allowed value of a discrete factor. */
export function snapToAllowed(values: readonly number[], v: number): number {
  let best = values[0]!;
  for (const a of values) if (Math.abs(a - v) < Math.abs(best - v)) best = a;
  return best;
}

/**
 * One point in natural units → coded vector aligned with `factors`: numeric factors in [-1, 1],
 * categorical factors as their level index (0-based).
 */
export function codePoint(factors: readonly Factor[], point: Point): number[] {
  return factors.map((f) => {
    const v = point[f.name];
    if (v === undefined || v === null || v === '') {
      throw invalidInput(f.name, `missing value for factor ${f.name}; give a value for every factor`);
    }
    if (f.kind === 'categorical') return levelIndex(f, v);
    const n = typeof v === 'number' ? v : Number(v);
    if (!Number.isFinite(n)) throw invalidInput(f.name, `${f.name} must be a finite number, got "${String(v)}"`);
    return toCoded(f, n);
  });
}

/** Coded vector (as from codePoint) → point in natural units. Discrete values snap to allowed ones. */
export function decodePoint(factors: readonly Factor[], coded: readonly number[]): Point {
  const p: Point = {};
  factors.forEach((f, i) => {
    const c = coded[i]!;
    if (f.kind === 'categorical') p[f.name] = f.levels[Math.round(c)]!;
    else if (f.kind === 'discrete') p[f.name] = snapToAllowed(f.values, toNatural(f, c));
    else p[f.name] = toNatural(f, c);
  });
  return p;
}
