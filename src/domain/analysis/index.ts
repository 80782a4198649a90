/**
 * The analysis engine: `analyze(request)` fits the requested model to campaign data and answers
 * with coefficients, ANOVA, fit statistics, fitted values and residuals; screening effects,
 * response surfaces, diagnostics and desirability build on it.
 */
export { analyze, resultOfLinearFit } from './analyze';
export * from './types';
export * from './distributions';
export { leastSquares, pivotedQr, toColumnMajor, type LeastSquaresFit, type LeastSquaresOptions } from './least-squares';
export { buildModelFrame, inferFactors, type ModelFrame } from './model-frame';
export { fitLinearModel, type LinearModelFit } from './linear-model';
export { predictor, type Predictor } from './predict';
export {
  canonicalAnalysis,
  contourGrid,
  interactionPlot,
  quadraticForm,
  ridgeAnalysis,
  sliceData,
  stationaryPoint,
  steepestAscent,
  type CanonicalAnalysis,
  type ContourGrid,
  type InteractionPlot,
  type PathPoint,
  type QuadraticForm,
  type StationaryPoint,
  type SurfaceKind,
} from './response-surface';
export {
  halfNormalPlotData,
  lenthPseudoStandardError,
  screeningEffects,
  type EffectEstimate,
  type HalfNormalPoint,
  type LenthResult,
  type ScreeningResult,
} from './effects';
export { leverages, regressionDiagnostics, type Diagnostics, type NormalPlotPoint } from './diagnostics';
export {
  desirability,
  individualDesirability,
  maximizeDesirability,
  type DesirabilityOptimum,
  type DesirabilityResponse,
  type DesirabilityValue,
  type MaximizeDesirabilityOptions,
} from './desirability';
export { fitLogisticModel, type LogisticFit, type Separation } from './logistic';
export { backwardReduction, boxCox, type BackwardReductionResult, type BoxCoxResult, type ReductionStep } from './model-selection';
export { splitPlotAnalysis, type SplitPlotRequest, type SplitPlotResult, type SplitPlotSummary, type SplitPlotTerm } from './split-plot';
