/** Checks of a factor space and of points against it, each error naming the field and the fix. */
import { invalidInput } from '../errors';
import type { DisallowedCombination, Factor, FactorSpace, LinearConstraint, Point } from './types';

const NAME = /^[A-Za-z][A-Za-z0-9_]{0,39}$/;

export function validateFactors(factors: readonly Factor[], field = 'factors'): void {
  if (!Array.isArray(factors) || factors.length === 0) throw invalidInput(field, 'give at least one factor');
  const seen = new Set<string>();
  factors.forEach((f, i) => {
    const at = `${field}[${i}]`;
    if (!NAME.test(f.name ?? '')) {
      throw invalidInput(`${at}.name`, 'a factor name starts with a letter and has only letters, digits and _ (at most 40)');
    }
    if (seen.has(f.name)) throw invalidInput(`${at}.name`, `factor name "${f.name}" is used twice; names must be unique`);
    seen.add(f.name);
    if (f.kind === 'continuous') {
      if (!Number.isFinite(f.low) || !Number.isFinite(f.high)) throw invalidInput(`${at}.low`, 'low and high must be finite numbers');
      if (!(f.low < f.high)) throw invalidInput(`${at}.high`, `high (${f.high}) must be greater than low (${f.low})`);
    } else if (f.kind === 'discrete') {
      if (!Array.isArray(f.values) || f.values.length < 2 || f.values.some((v: number) => !Number.isFinite(v))) {
        throw invalidInput(`${at}.values`, 'a discrete factor needs at least two finite numeric values');
      }
      if (new Set(f.values).size !== f.values.length) throw invalidInput(`${at}.values`, 'discrete values must be distinct');
    } else if (f.kind === 'categorical') {
      if (!Array.isArray(f.levels) || f.levels.length < 2) throw invalidInput(`${at}.levels`, 'a categorical factor needs at least two levels');
      if (new Set(f.levels).size !== f.levels.length) throw invalidInput(`${at}.levels`, 'level labels must be distinct');
    } else {
      throw invalidInput(`${at}.kind`, 'kind must be "continuous", "discrete" or "categorical"');
    }
  });
}

export function constraintValue(c: LinearConstraint, point: Point): number {
  let s = 0;
  for (const [name, coef] of Object.entries(c.terms)) s += coef * Number(point[name]);
  return s;
}

/** True when the point satisfies every linear constraint (with a small tolerance) and no disallowed combination. */
export function isFeasible(space: FactorSpace, point: Point, tol = 1e-9): boolean {
  for (const c of space.constraints ?? []) {
    const v = constraintValue(c, point);
    if (c.min !== undefined && v < c.min - tol) return false;
    if (c.max !== undefined && v > c.max + tol) return false;
  }
  for (const d of space.disallowed ?? []) if (matchesCombination(d, point)) return false;
  return true;
}

export function matchesCombination(d: DisallowedCombination, point: Point): boolean {
  return Object.entries(d.levels).every(([k, v]) => String(point[k]) === String(v));
}

export function validateSpace(space: FactorSpace): void {
  validateFactors(space.factors);
  const byName = new Map(space.factors.map((f) => [f.name, f]));
  (space.constraints ?? []).forEach((c, i) => {
    const at = `constraints[${i}]`;
    if (c.min === undefined && c.max === undefined) throw invalidInput(at, 'a constraint needs min, max or both');
    for (const [name, coef] of Object.entries(c.terms ?? {})) {
      const f = byName.get(name);
      if (!f) throw invalidInput(`${at}.terms.${name}`, `unknown factor "${name}" in a constraint`);
      if (f.kind === 'categorical') throw invalidInput(`${at}.terms.${name}`, 'linear constraints apply to numeric factors only');
      if (!Number.isFinite(coef)) throw invalidInput(`${at}.terms.${name}`, 'a constraint coefficient must be a finite number');
    }
  });
  (space.disallowed ?? []).forEach((d, i) => {
    for (const name of Object.keys(d.levels ?? {})) {
      if (!byName.has(name)) throw invalidInput(`disallowed[${i}].levels.${name}`, `unknown factor "${name}"`);
    }
  });
}
