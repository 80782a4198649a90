/** Shapes shared by every design construction: the request, the runs and the diagnostics. */
import type { DisallowedCombination, Factor, LinearConstraint, Point, StandardModel } from '../factors';

export type DesignMethod =
  | 'full-factorial'
  | 'fractional-factorial'
  | 'plackett-burman'
  | 'definitive-screening'
  | 'central-composite'
  | 'box-behnken'
  | 'latin-hypercube'
  | 'sobol'
  | 'optimal';

export const DESIGN_METHODS: readonly DesignMethod[] = [
  'full-factorial',
  'fractional-factorial',
  'plackett-burman',
  'definitive-screening',
  'central-composite',
  'box-behnken',
  'latin-hypercube',
  'sobol',
  'optimal',
];

export type AxialDistance = 'rotatable' | 'orthogonal' | 'face-centred' | number;

export interface DesignSpec {
  factors: Factor[];
  method: DesignMethod;
  /** Number of new runs (optimal, space-filling and Plackett–Burman designs). */
  runs?: number;
  /** Model the design must support; also the model of the diagnostics. Default depends on the method. */
  model?: StandardModel;
  criterion?: 'D' | 'I';
  resolution?: number;
  /** Generators of a two-level fraction, e.g. ["E=ABCD"] with factors lettered A, B, C ... in order. */
  generators?: string[];
  centerPoints?: number;
  alpha?: AxialDistance;
  replicates?: number;
  blocks?: number;
  /**
   * Two-level full factorials and fractions: the block generators, as interaction words over the
   * factor letters (e.g. ["ABC", "CDE"]) or names joined by *; k words give 2^k blocks. Left out,
   * the generators are chosen by search.
   */
  blockGenerators?: string[];
  /**
   * Optimal designs: blocks as fixed effects (default) or as random effects with variance ratio
   * `varianceRatio` = σ²(block) / σ², like whole plots with no hard-to-change factor.
   */
  blockEffects?: 'fixed' | 'random';
  wholePlots?: number;
  constraints?: LinearConstraint[];
  disallowed?: DisallowedCombination[];
  /** Runs already made (or already planned): they come first, flagged `existing`, and are never moved. */
  existingRuns?: Point[];
  seed?: number;
  /** Optimal designs: random starts of the coordinate exchange (default 20). */
  starts?: number;
  /** Split-plot designs: η = σ²(whole plot) / σ²(sub-plot); random blocks: σ²(block) / σ² (default 1). */
  varianceRatio?: number;
  /** Settings of the power diagnostics (always computed; these defaults: effect 2σ, σ = 1, α = 0.05). */
  power?: PowerSettings;
}

export interface DesignRun {
  /** 1-based run order after randomisation (existing runs first). */
  order: number;
  /** Natural units (categorical levels as their labels). */
  values: Point;
  /** Coded per codePoint: numeric factors in [-1, 1] (axial points beyond), categorical as level index. */
  coded: number[];
  block?: number;
  wholePlot?: number;
  existing?: boolean;
}

export interface DesignDiagnostics {
  /** Number of runs, including existing ones. */
  runs: number;
  /** Number of model-matrix columns (parameters), intercept included. */
  parameters: number;
  /** Column rank of the model matrix (equals `parameters`: a singular design is refused). */
  rank: number;
  /** Model-matrix column labels. */
  columns: string[];
  /** |X'X / n|^(1/p): 1 for an orthogonal two-level design of the main-effects or interactions model. */
  dEfficiency: number;
  /** p / trace((X'X / n)^-1). */
  aEfficiency: number;
  /** trace(W) / trace(W (X'X / n)^-1), W the region's moment matrix: 1 for a design with X'X = n I. */
  iEfficiency: number;
  /** p / max over the region of n f(x)'(X'X)^-1 f(x). */
  gEfficiency: number;
  /** Average scaled prediction variance over the region, n trace(W (X'X)^-1). */
  averagePredictionVariance: number;
  /** Largest scaled prediction variance found over the region. */
  maxPredictionVariance: number;
  /** Largest variance inflation factor of the model columns (1 when they are orthogonal). */
  maxVif: number;
  vif: { column: string; vif: number }[];
  /** Correlations between model columns (intercept left out). */
  correlation: { labels: string[]; values: number[][] };
  /** Scaled prediction variance at fractions 0, 0.05, ..., 1 of the region. */
  fractionOfDesignSpace: { fraction: number[]; scaledPredictionVariance: number[] };
  /** Power of each term's F test, when power settings were given. */
  power?: TermPower[];
  /** Degrees of freedom left for error: runs − parameters. */
  errorDegreesOfFreedom: number;
  /** Plain-language remarks (e.g. axial points beyond the factor range). */
  notes: string[];
  /** Two-level fractions: generators, defining relation, word-length pattern and aliases. */
  fraction?: FractionSummary;
  /** Blocked designs: block sizes, block generators, the effects confounded with blocks, orthogonality. */
  blocking?: BlockingSummary;
  /** Central composite designs: the axial distance in coded units. */
  axialDistance?: number;
  /** Optimal designs: what the search optimised and how far it got. */
  optimal?: {
    criterion: 'D' | 'I';
    /** log |M| for D (M = X'V^-1 X for split-plot designs); average prediction variance trace(W M^-1) for I. */
    value: number;
    startsCompleted: number;
    stopped: boolean;
    wholePlots?: number;
    /** Random blocks: the number of blocks treated as random. */
    randomBlocks?: number;
    varianceRatio?: number;
    /** Split-plot and random-block designs: |X'V^-1 X / n|^(1/p), the D-efficiency under that error structure. */
    generalisedDEfficiency?: number;
  };
}

export interface FractionSummary {
  /** Generators in letters, e.g. "E=ABC" (factors lettered A, B, C ... in order, skipping I). */
  generators: string[];
  /** Factor letter → factor name. */
  letters: Record<string, string>;
  /** Words of the defining relation I = ..., in letters, with "-" for a negative word. */
  definingRelation: string[];
  resolution: number;
  /** Number of words of each length, keyed by length (3, 4, ...). */
  wordLengthPattern: Record<string, number>;
  /** For each main effect and two-factor interaction, the others it is aliased with. */
  aliases: { effect: string; aliases: string[] }[];
}

export interface BlockingSummary {
  /** Number of blocks of the new runs (runs already made, when any, sit apart in block 0). */
  blocks: number;
  runsPerBlock: { block: number; runs: number }[];
  /** Factorial designs: the interactions whose levels define the blocks, named by factor. */
  generators: string[];
  /** Effects confounded with blocks (each with the other words of its alias set in a fraction). */
  confounded: { effect: string; aliases: string[] }[];
  /** True when every model column is orthogonal to the block effects, so blocks do not bias the estimates. */
  orthogonal: boolean;
  /** Largest |correlation| between a model column and a block indicator. */
  maxBlockCorrelation: number;
}

export interface PowerSettings {
  /** Change in the response from a factor's low to high setting that should be detected (default 2σ). */
  effectSize?: number;
  /** Residual standard deviation (default 1). */
  sigma?: number;
  /** Test level (default 0.05). */
  alpha?: number;
}

export interface TermPower {
  term: string;
  numeratorDf: number;
  denominatorDf: number;
  noncentrality: number;
  power: number;
}

export interface DesignResult {
  runs: DesignRun[];
  diagnostics: DesignDiagnostics;
  method: string;
  model: StandardModel;
  terms: string[];
  /** The seed the run order came from (default 1 when none was given). */
  seed: number;
}

/** A run under construction: coded coordinates plus its grouping, before randomisation. */
export interface CodedRun {
  coded: number[];
  block?: number;
  wholePlot?: number;
}
