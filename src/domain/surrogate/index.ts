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
