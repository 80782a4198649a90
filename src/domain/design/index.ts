/** The design engine: classical constructions, randomisation, diagnostics and next-run choice. */
export * from './types';
export { generateDesign, augmentDesign, defaultModel, DEFAULT_SEED } from './generate';
export { nextRunByPredictionVariance, resolveTerms, candidateSet, type NextRunOptions, type NextRunByVariance } from './prediction-variance';
export { fullFactorialDesign, centreRuns } from './full-factorial';
export { centralCompositeDesign, rotatableAlpha, orthogonalAlpha, orthogonalBlockingAlpha, DEFAULT_CCD_CENTRE_RUNS } from './central-composite';
export * from './box-behnken';
export { randomiseRunOrder } from './randomise';
export { designDiagnostics, assertEstimable } from './diagnostics';
export * from './fractional-factorial';
export * from './plackett-burman';
export { summariseFraction } from './generate';
export { coordinateExchange, DEFAULT_STARTS, type OptimalProblem, type OptimalSearchOptions, type OptimalSearchResult, type OptimalityCriterion } from './optimal';
export { optimalDesign, exchangeLevels, evenGroups, blockFactor, type OptimalDesignOptions } from './optimal-design';
export { codedRegion, momentMatrix, columnFactorParts, randomFeasiblePoint, type CodedRegion } from './region';
export { fastModel, type FastModel } from './model-rows';
export { noncentralFCdf, fTestPower } from './power';
export { varianceInflation, columnCorrelations, fractionOfDesignSpace, termPower, FDS_FRACTIONS, type DiagnosticsOptions } from './diagnostics';
export * from './definitive-screening';
