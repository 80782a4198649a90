/**
 * The analysis engine: `analyze(request)` fits the requested model to campaign data and answers
 * with coefficients, ANOVA, fit statistics, fitted values and residuals.
 */
import { DomainError } from '../errors';
import { fitLinearModel, type LinearModelFit } from './linear-model';
import { buildModelFrame } from './model-frame';
import type { AnalysisRequest, AnalysisResult } from './types';

export * from './types';
export * from './distributions';
export { leastSquares, pivotedQr, toColumnMajor, type LeastSquaresFit, type LeastSquaresOptions } from './least-squares';
export { buildModelFrame, inferFactors, type ModelFrame } from './model-frame';
export { fitLinearModel, type LinearModelFit } from './linear-model';
export { predictor, type Predictor } from './predict';
export {
  desirability,
  individualDesirability,
  maximizeDesirability,
  type DesirabilityOptimum,
  type DesirabilityResponse,
  type DesirabilityValue,
  type MaximizeDesirabilityOptions,
} from './desirability';

function covarianceRows(lm: LinearModelFit): number[][] {
  const r = lm.fit.rank;
  const v = lm.fit.unscaledCovariance;
  return Array.from({ length: r }, (_, i) => Array.from({ length: r }, (_, j) => v[i * r + j]! * lm.meanSquaredError));
}

/** Result fields shared by every gaussian analysis, from a linear model fit. */
export function resultOfLinearFit(request: AnalysisRequest, lm: LinearModelFit): AnalysisResult {
  const { frame } = lm;
  return {
    family: 'gaussian',
    response: request.response,
    coding: frame.coding,
    factors: frame.factors,
    n: frame.n,
    excludedRows: frame.excludedRows,
    intercept: frame.intercept,
    terms: frame.terms.filter((t) => t.parts.length > 0).map((t) => t.label),
    coefficients: lm.coefficients,
    aliased: lm.aliased,
    rank: lm.fit.rank,
    anova: lm.anova,
    rSquared: lm.rSquared,
    adjustedRSquared: lm.adjustedRSquared,
    residualStdError: lm.residualStdError,
    residualDf: lm.residualDf,
    ...(lm.lackOfFit ? { lackOfFit: lm.lackOfFit } : {}),
    ...(lm.residualDf > 0 ? { covariance: covarianceRows(lm) } : {}),
    fitted: Array.from(lm.fit.fitted),
    residuals: Array.from(lm.fit.residuals),
    observed: Array.from(frame.y),
  };
}

/** Fit the requested model and answer with coefficients, ANOVA and fit statistics. */
export function analyze(request: AnalysisRequest): AnalysisResult {
  const family = request.family ?? 'gaussian';
  if (family !== 'gaussian') {
    throw new DomainError('unsupported', `family "${family}" is not available yet; use "gaussian"`, 'family');
  }
  const frame = buildModelFrame(request);
  return resultOfLinearFit(request, fitLinearModel(frame));
}
