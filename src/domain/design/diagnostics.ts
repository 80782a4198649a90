/** Diagnostics shown beside every design: rank check and efficiencies of the model matrix. */
// Atkinson, Donev & Tobias (2007), Optimum Experimental Designs, with SAS, ch. 10-11 (D- and A-efficiency)
import { DomainError } from '../errors';
import { compileModel, modelMatrix, type Factor, type ModelTerm } from '../factors';
import { cholesky, dependentColumns, informationMatrix, inverseFromCholesky, logDetFromCholesky } from './linear-algebra';
import type { DesignDiagnostics } from './types';

/**
 * Throws DomainError 'singular_design' naming the terms that cannot be estimated (their columns
 * are linear combinations of earlier columns, or there are fewer runs than parameters).
 */
export function assertEstimable(x: Float64Array, n: number, labels: readonly string[], termOfColumn: readonly number[], terms: readonly ModelTerm[]): void {
  const p = labels.length;
  const dependent = dependentColumns(x, n, p);
  if (dependent.length === 0) return;
  const inestimable = [...new Set(dependent.map((j) => terms[termOfColumn[j]!]!.label))];
  const why = n < p ? ` (${n} runs for ${p} parameters)` : '';
  throw new DomainError(
    'singular_design',
    `the design cannot estimate ${inestimable.join(', ')}${why}; add runs, more levels, or drop those terms from the model`,
    'model',
    { inestimable, columns: dependent.map((j) => labels[j]!) },
  );
}

export function designDiagnostics(factors: readonly Factor[], terms: readonly ModelTerm[], codedRuns: readonly ArrayLike<number>[], notes: string[] = []): DesignDiagnostics {
  const model = compileModel(factors, terms);
  const { data, n, p } = modelMatrix(model, codedRuns);
  assertEstimable(data, n, model.labels, model.termOfColumn, terms);
  const xtx = informationMatrix(data, n, p);
  const l = cholesky(xtx, p);
  if (!l) {
    throw new DomainError('singular_design', 'the information matrix of this design is numerically singular; add runs or drop terms', 'model');
  }
  const logDet = logDetFromCholesky(l, p);
  const inv = inverseFromCholesky(l, p);
  let trace = 0;
  for (let i = 0; i < p; i++) trace += inv[i * p + i]!;
  return {
    runs: n,
    parameters: p,
    rank: p,
    columns: model.labels,
    dEfficiency: Math.exp(logDet / p) / n,
    aEfficiency: p / (n * trace),
    errorDegreesOfFreedom: n - p,
    notes,
  };
}
