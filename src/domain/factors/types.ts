/** Factor and response definitions: the vocabulary every stage of a campaign shares. */

export type FactorValue = number | string;
/** A point in the factor space in natural units, keyed by factor name. */
export type Point = Record<string, FactorValue>;

interface FactorBase {
  name: string;
  /** Display unit (e.g. "g", "mm", "V"). Values inside the domain are in this unit as entered. */
  unit?: string;
  /** Hard to change between runs (e.g. a surface bed): candidates for whole plots. */
  hardToChange?: boolean;
}

export interface ContinuousFactor extends FactorBase {
  kind: 'continuous';
  low: number;
  high: number;
}

export interface DiscreteFactor extends FactorBase {
  kind: 'discrete';
  /** Allowed numeric values, at least two, ascending. */
  values: number[];
}

export interface CategoricalFactor extends FactorBase {
  kind: 'categorical';
  /** Level labels, at least two. */
  levels: string[];
}

export type Factor = ContinuousFactor | DiscreteFactor | CategoricalFactor;
export type NumericFactor = ContinuousFactor | DiscreteFactor;

/** A linear inequality over continuous / discrete factors, in natural units: min ≤ Σ c·x ≤ max. */
export interface LinearConstraint {
  terms: Record<string, number>;
  min?: number;
  max?: number;
}

/** A combination of levels that must never be run together (e.g. ice with the heaviest payload). */
export interface DisallowedCombination {
  levels: Record<string, FactorValue>;
}

export interface FactorSpace {
  factors: Factor[];
  constraints?: LinearConstraint[];
  disallowed?: DisallowedCombination[];
}

export type ResponseGoal = 'maximize' | 'minimize' | 'target';

export interface ResponseDefinition {
  name: string;
  unit?: string;
  goal: ResponseGoal;
  /** For goal "target". */
  target?: number;
  /** Acceptable bounds used by desirability. */
  lower?: number;
  upper?: number;
}

export function isNumericFactor(f: Factor): f is NumericFactor {
  return f.kind !== 'categorical';
}
