/** Shapes of a next-trials request and its answer (the API body of POST /api/v1/suggestions). */
import type { DisallowedCombination, Factor, FactorValue, LinearConstraint, Point } from '../factors';
import type { DesirabilityResponse } from '../analysis';
import type { KernelKind } from './kernels';

export type SuggestionStrategy = 'improve' | 'explore' | 'refine' | 'confirm';

/** One observed trial: factor values in natural units keyed by factor name, the response column, and an optional failed flag. */
export type SuggestionDataRow = Record<string, FactorValue | boolean | null | undefined> & { failed?: boolean };

export interface SuggestionRequest {
  factors: Factor[];
  data: SuggestionDataRow[];
  /** Name of the response column in the data rows. */
  response: string;
  goal: 'maximize' | 'minimize';
  /** How many trials to suggest. */
  count: number;
  strategy?: SuggestionStrategy;
  /** Minutes it costs to change the level of a hard-to-change factor. */
  swapCost?: Record<string, number>;
  /** Lowest acceptable probability that a suggested trial does not fail. */
  feasibilityThreshold?: number;
  seed?: number;
  /** Rig minutes per trial, to weigh change costs against a batch (default 10). */
  trialMinutes?: number;
  constraints?: LinearConstraint[];
  disallowed?: DisallowedCombination[];
  kernel?: KernelKind;
  /**
   * How "improve" builds a batch: "believer" (default) conditions the model on each chosen trial before the
   * next pick; "penalised" keeps the acquisition and lowers it around the chosen trials (local penalisation).
   */
  batch?: 'believer' | 'penalised';
  /**
   * Several responses at once: each trial's overall desirability (Derringer & Suich) of these responses
   * becomes the modelled response, maximised; `response` then only labels it and `goal` is ignored.
   */
  responses?: DesirabilityResponse[];
}

export interface Suggestion {
  /** Factor values in natural units. */
  values: Point;
  /** Predicted response (posterior mean), response units. */
  mean: number;
  /** Posterior standard deviation of the mean response at this point. */
  sd: number;
  /** Value of the strategy's acquisition function (expected improvement in response units for "improve"). */
  acquisition: number;
  /** Probability that the trial does not fail, when failed trials were given. */
  feasibility?: number;
  /** One line a person can read: why this trial. */
  reason: string;
}

export interface SurrogateSummary {
  kernel: KernelKind;
  /** Length scale per factor, in coded units (numeric factors span [-1, 1]). */
  lengthScales: Record<string, number>;
  /** Estimated noise variance, squared response units. */
  noiseVariance: number;
  /** Signal (process) variance, squared response units. */
  signalVariance: number;
  logMarginalLikelihood: number;
  /** Observations the surrogate was fitted to (failed trials excluded). */
  observations: number;
  /** Leave-one-out check of the surrogate (hyperparameters held): can it be trusted? */
  leaveOneOut: {
    /** Per fitted trial: 1-based trial number in the request's data, y − μ₋ᵢ, and that divided by its predictive sd. */
    residuals: { trial: number; residual: number; standardised: number }[];
    /** Root mean square of the residuals, response units. */
    rmse: number;
    /** Share of standardised residuals within ±2 (about 0.95 when the model's uncertainty is honest). */
    withinTwoSd: number;
  };
  /** Set when several responses were combined: the modelled response is their overall desirability. */
  desirabilityOf?: string[];
  /** Several responses: each response's own surrogate (the suggestions' mean and sd are of the overall desirability under these). */
  responseModels?: Record<string, { lengthScales: Record<string, number>; noiseVariance: number; signalVariance: number; logMarginalLikelihood: number }>;
  /** For "improve": the acquisition and batch method used, in words. */
  acquisition?: string;
}

export interface SuggestionResult {
  suggestions: Suggestion[];
  model: SurrogateSummary;
}
