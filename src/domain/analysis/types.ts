/** Shapes of an analysis request and its answer (the body and reply of POST /api/v1/analyses). */
import type { Factor } from '../factors';

export type DataRow = Record<string, number | string | null | undefined>;
export type Coding = 'natural' | 'coded';
export type Family = 'gaussian' | 'binomial';

export interface AnalysisRequest {
  /** One object per run: factor columns and the response column. */
  data: DataRow[];
  /** Name of the response column. */
  response: string;
  /** Model terms, e.g. ["x1", "x2", "x1*x2", "x1^2"]; a categorical factor's name stands for its coded columns. */
  terms: string[];
  /** Include an intercept (default true). */
  intercept?: boolean;
  /** Factor definitions for coding and categorical columns; inferred from the data when absent. */
  factors?: Factor[];
  /** Units of numeric factors in the model: default "coded" when factors are given, else "natural". */
  coding?: Coding;
  family?: Family;
  /** Include regression diagnostics (default: when there are at most 20,000 runs). */
  diagnostics?: boolean;
  /** Column naming each run's whole plot: fit by REML with a whole-plot random effect (split-plot data). */
  wholePlot?: string;
}

export interface CoefficientRow {
  /** Model-matrix column label, e.g. "payload", "payload*gain", "surface[grass]". */
  term: string;
  /** The model term the column belongs to, e.g. "surface" for "surface[grass]". */
  modelTerm: string;
  estimate: number;
  /** null when there are no residual degrees of freedom. */
  stdError: number | null;
  statistic: number | null;
  p: number | null;
  ci95: [number, number] | null;
}

export interface AnovaRow {
  /** "Model", a term label, "Residual", "Lack of fit", "Pure error" or "Total". */
  source: string;
  df: number;
  ss: number;
  ms: number | null;
  f: number | null;
  p: number | null;
  /** Split-plot fits: Kenward–Roger denominator df of the term's F test, and the error it is tested against. */
  denominatorDf?: number;
  stratum?: 'whole plot' | 'subplot';
}

export interface LackOfFit {
  lackOfFitDf: number;
  lackOfFitSs: number;
  pureErrorDf: number;
  pureErrorSs: number;
  f: number;
  p: number;
  /** Distinct factor settings among the runs. */
  groups: number;
}

export interface AnalysisResult {
  family: Family;
  response: string;
  coding: Coding;
  /** Factors as used (given, or inferred from the data). */
  factors: Factor[];
  /** Runs used, and the indices of data rows left out because their response was empty. */
  n: number;
  excludedRows: number[];
  intercept: boolean;
  /** Model terms as parsed (canonical labels, intercept excluded). */
  terms: string[];
  coefficients: CoefficientRow[];
  /** Model-matrix columns that are linear combinations of earlier ones (not estimable). */
  aliased: string[];
  rank: number;
  anova: AnovaRow[];
  rSquared: number;
  adjustedRSquared: number;
  residualStdError: number | null;
  residualDf: number;
  lackOfFit?: LackOfFit;
  /** PRESS and predicted R² (null when a run has leverage 1); present with diagnostics. */
  press?: number | null;
  predictedRSquared?: number | null;
  diagnostics?: import('./diagnostics').Diagnostics;
  /** Factor settings of the runs used (natural units, as entered), with diagnostics; for plots of design points. */
  runs?: Record<string, number | string>[];
  /** Covariance matrix of the estimates (σ̂²·(XᵀX)⁻¹), in coefficient order; absent without residual df. */
  covariance?: number[][];
  /** For family "binomial": deviances, AIC, convergence and any separation found. In the ANOVA of a
   * binomial fit, `ss` holds deviance (likelihood-ratio χ² for the model and term rows) and `p` its χ² p-value. */
  logistic?: {
    deviance: number;
    nullDeviance: number;
    aic: number;
    iterations: number;
    converged: boolean;
    separation?: import('./logistic').Separation;
  };
  /** For split-plot fits (request.wholePlot): REML variance components and the whole-plot structure. */
  varianceComponents?: { wholePlot: number; residual: number };
  splitPlot?: import('./split-plot').SplitPlotSummary;
  /** For models with squared numeric terms: the stationary point and canonical analysis. */
  stationaryPoint?: import('./response-surface').StationaryPoint | null;
  canonical?: import('./response-surface').CanonicalAnalysis;
  fitted: number[];
  residuals: number[];
  /** Response values of the runs used, in the same order as fitted and residuals. */
  observed: number[];
}
