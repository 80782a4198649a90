/** Surrogate models and next-trial strategies: the public entry points of this area. */
export * from './types';
export { KERNEL_KINDS, correlation, type KernelKind } from './kernels';
export {
  fitGaussianProcess,
  logMarginalLikelihood,
  predict,
  leaveOneOutResiduals,
  type GaussianProcessModel,
  type GaussianProcessOptions,
  type Prediction,
} from './gaussian-process';
export { expectedImprovement, logExpectedImprovement, standardNormalCdf, standardNormalPdf } from './acquisition';
export { minimizeBounded } from './lbfgs';
export { suggestTrials, fitSurrogate, prepareData } from './suggest';
export { fitFeasibility, feasibilityProbability, type FeasibilityModel } from './feasibility';
export { refineDesignCandidates, type RefinePick } from './refine';
export { DEFAULT_FEASIBILITY_THRESHOLD, DEFAULT_TRIAL_MINUTES } from './suggest';
export { surrogateSlice, surrogateGrid, type SurrogateSlice, type SurrogateGrid, type SlicePoint } from './slice';
