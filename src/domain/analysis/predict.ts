/**
 * Predictions from a fitted model: the model row of any point in the factor space, the predicted
 * mean and its standard error.
 */
import { codePoint, compileModel, levelIndex, parseTerm, INTERCEPT, type Point } from '../factors';
import { invalidInput } from '../errors';
import type { AnalysisResult } from './types';

export interface Predictor {
  /** Model-matrix column labels of the estimable coefficients, in coefficient order. */
  labels: string[];
  /** The model row (estimable columns only) of a point in natural units. */
  row(point: Point): Float64Array;
  /** Predicted mean response at a point in natural units. */
  predict(point: Point): number;
  /** Standard error of the predicted mean (null without residual degrees of freedom). */
  standardError(point: Point): number | null;
}

/** A predictor for a gaussian analysis result. */
export function predictor(result: AnalysisResult): Predictor {
  const factors = result.factors;
  const terms = [...(result.intercept ? [INTERCEPT] : []), ...result.terms.map((t) => parseTerm(t, factors))];
  const model = compileModel(factors, terms);
  const colOf = new Map(model.labels.map((l, j) => [l, j]));
  const cols = result.coefficients.map((c) => {
    const j = colOf.get(c.term);
    if (j === undefined) throw invalidInput('result', `coefficient ${c.term} does not match the model's columns`);
    return j;
  });
  const beta = result.coefficients.map((c) => c.estimate);
  const full = new Float64Array(model.p);
  const toVector = (point: Point): number[] =>
    result.coding === 'coded'
      ? codePoint(factors, point)
      : factors.map((f) => {
          const v = point[f.name];
          if (f.kind === 'categorical') return levelIndex(f, v ?? '');
          const num = typeof v === 'number' ? v : Number(v);
          if (!Number.isFinite(num)) throw invalidInput(f.name, `${f.name} must be a finite number`);
          return num;
        });
  const row = (point: Point): Float64Array => {
    model.row(toVector(point), full);
    return Float64Array.from(cols, (j) => full[j]!);
  };
  return {
    labels: result.coefficients.map((c) => c.term),
    row,
    predict(point) {
      const x = row(point);
      let s = 0;
      for (let k = 0; k < x.length; k++) s += x[k]! * beta[k]!;
      return s;
    },
    standardError(point) {
      const cov = result.covariance;
      if (!cov) return null;
      const x = row(point);
      let s = 0;
      for (let i = 0; i < x.length; i++) {
        let t = 0;
        for (let j = 0; j < x.length; j++) t += cov[i]![j]! * x[j]!;
        s += x[i]! * t;
      }
      return Math.sqrt(Math.max(0, s));
    },
  };
}
