/**
 * Gaussian-process regression on coded inputs: ARD kernel (Matérn 5/2 or squared exponential), an
 * exchangeable kernel for categorical inputs, estimated noise variance (replicates inform it through the
 * likelihood), hyperparameters by maximising the log marginal likelihood from several starts with
 * analytic gradients, and the closed-form predictive mean and standard deviation.
 */
// Rasmussen & Williams (2006), Gaussian Processes for Machine Learning, MIT Press, ch. 2 and 5 (alg. 2.1, eq. 5.9)
import { invalidInput } from '../errors';
import type { Factor } from '../factors';
import { seededRandom } from '../random';
import { correlation, type KernelKind } from './kernels';
import { minimizeBounded } from './lbfgs';
import { choleskyInPlace, choleskyLogDet, inverseFromCholesky, inverseLowerFromCholesky, solveLower, solveUpperTransposed } from './linear-algebra';

const LOG_2PI = Math.log(2 * Math.PI);
/** Added to the diagonal for numerical stability (in standardised response units). */
const JITTER = 1e-10;

export interface GaussianProcessOptions {
  kernel?: KernelKind;
  /** Per input column: true when the column holds a categorical level index. */
  categorical?: readonly boolean[];
  /** Optimiser starts (the default start plus seeded random ones). Default 4. */
  starts?: number;
  seed?: number;
  maxIterations?: number;
  /** Standardise the response (subtract its mean, divide by its sd) before fitting. Default true. */
  normalize?: boolean;
  /** Fixed hyperparameters (no optimisation), in the units of the (standardised, if normalize) response. */
  fixed?: { lengthScales: readonly number[]; signalVariance: number; noiseVariance: number };
  /** Bounds on the length scales in coded units. Default [0.01, 100]. */
  lengthScaleBounds?: [number, number];
  /** Bounds on the noise variance relative to the (standardised) response. Default [1e-6, 10]. */
  noiseVarianceBounds?: [number, number];
}

export interface GaussianProcessModel {
  kernel: KernelKind;
  /** The factors behind the coded inputs, when the model was fitted to a campaign (for slices in natural units). */
  factors?: Factor[];
  categorical: boolean[];
  /** Training inputs, one row per observation. */
  inputs: Float64Array[];
  n: number;
  d: number;
  lengthScales: number[];
  /** Signal (process) variance, in squared response units. */
  signalVariance: number;
  /** Noise variance, in squared response units. */
  noiseVariance: number;
  /** Log marginal likelihood of the response as given (response units). */
  logMarginalLikelihood: number;
  /** Log marginal likelihood of the standardised response (what the optimiser maximised). */
  logMarginalLikelihoodStandardised: number;
  yMean: number;
  yScale: number;
  /** Hyperparameters on the optimiser's scale: log ℓ_1..d, log σ_f², log σ_n² (standardised units). */
  theta: Float64Array;
  /** Cholesky factor of K (standardised units), row-major n × n. */
  cholesky: Float64Array;
  /** K⁻¹ y (standardised units). */
  alpha: Float64Array;
  /** Standardised training responses. */
  yStandardised: Float64Array;
  /** Work done by the hyperparameter search (all zero with fixed hyperparameters). */
  optimisation?: { starts: number; iterations: number; evaluations: number; gradientEvaluations: number };
}

/** Per-pair, per-dimension squared differences for the lower triangle (i > j), pair-major. */
function pairwiseSquaredDifferences(x: readonly ArrayLike<number>[], categorical: readonly boolean[]): Float64Array {
  const n = x.length;
  const d = categorical.length;
  const out = new Float64Array(((n * (n - 1)) / 2) * d);
  let p = 0;
  for (let i = 1; i < n; i++) {
    const xi = x[i]!;
    for (let j = 0; j < i; j++) {
      const xj = x[j]!;
      for (let k = 0; k < d; k++) {
        if (categorical[k]) out[p++] = xi[k] === xj[k] ? 0 : 1;
        else {
          const diff = xi[k]! - xj[k]!;
          out[p++] = diff * diff;
        }
      }
    }
  }
  return out;
}

interface LikelihoodWork {
  n: number;
  d: number;
  kind: KernelKind;
  y: Float64Array;
  /** Per-pair, per-dimension squared differences (computed once per fit). */
  diffs: Float64Array;
  /** Buffers reused across evaluations: K and its factor, r² per pair, L⁻ᵀ and the lower triangle of K⁻¹. */
  k: Float64Array;
  r2: Float64Array;
  u: Float64Array | null;
  inv: Float64Array | null;
  /** Increments whenever `k` is overwritten, so a deferred gradient knows whether its factor is still there. */
  generation: number;
  evaluations: number;
  gradients: number;
}

function likelihoodWork(n: number, d: number, kind: KernelKind, y: Float64Array, diffs: Float64Array): LikelihoodWork {
  return {
    n, d, kind, y, diffs,
    k: new Float64Array(n * n),
    r2: new Float64Array((n * (n - 1)) / 2),
    u: null,
    inv: null,
    generation: 0,
    evaluations: 0,
    gradients: 0,
  };
}

/** Builds K (lower triangle holds the signal part, diagonal the full variance) and r² per pair. */
function buildCovariance(work: LikelihoodWork, theta: ArrayLike<number>, k: Float64Array, r2: Float64Array): void {
  const { n, d, kind, diffs } = work;
  const w = new Float64Array(d);
  for (let c = 0; c < d; c++) w[c] = Math.exp(-2 * theta[c]!);
  const sf2 = Math.exp(theta[d]!);
  const sn2 = Math.exp(theta[d + 1]!);
  let p = 0;
  for (let i = 0; i < n; i++) {
    const row = i * n;
    for (let j = 0; j < i; j++) {
      let s = 0;
      const base = p * d;
      for (let c = 0; c < d; c++) s += diffs[base + c]! * w[c]!;
      r2[p] = s;
      k[row + j] = sf2 * correlation(kind, s);
      p++;
    }
    k[row + i] = sf2 + sn2 + JITTER;
  }
}

/**
 * Log marginal likelihood log p(y | X, θ) and its gradient with respect to θ = (log ℓ_1..d, log σ_f², log σ_n²)
 * for a zero-mean GP. Returns value −Infinity when K is not numerically positive definite.
 */
export function logMarginalLikelihood(
  inputs: readonly ArrayLike<number>[],
  y: ArrayLike<number>,
  theta: ArrayLike<number>,
  options: { kernel?: KernelKind; categorical?: readonly boolean[] } = {},
): { value: number; gradient: Float64Array } {
  const d = inputs[0]?.length ?? 0;
  const categorical = (options.categorical ?? new Array<boolean>(d).fill(false)).slice();
  const work = likelihoodWork(inputs.length, d, options.kernel ?? 'matern52', Float64Array.from(y), pairwiseSquaredDifferences(inputs, categorical));
  const r = likelihoodLazy(work, theta);
  return { value: r.value, gradient: r.gradient() };
}

/** The value now (one Cholesky factorisation); the gradient (which needs K⁻¹) only when asked for. */
function likelihoodLazy(work: LikelihoodWork, theta: ArrayLike<number>): { value: number; gradient: () => Float64Array } {
  const { n, d } = work;
  const t = Float64Array.from(theta);
  const factorised = (): boolean => {
    work.generation++;
    work.evaluations++;
    buildCovariance(work, t, work.k, work.r2);
    return choleskyInPlace(work.k, n);
  };
  if (!factorised()) return { value: -Infinity, gradient: () => new Float64Array(d + 2) };
  const generation = work.generation;
  const alpha = solveUpperTransposed(work.k, n, solveLower(work.k, n, work.y));
  let fit = 0;
  for (let i = 0; i < n; i++) fit += work.y[i]! * alpha[i]!;
  const value = -0.5 * fit - 0.5 * choleskyLogDet(work.k, n) - 0.5 * n * LOG_2PI;
  return {
    value,
    gradient: () => {
      // Another evaluation may have reused the buffers since: factorise again (rare; the optimiser asks at once).
      if (work.generation !== generation) factorised();
      return likelihoodGradient(work, t, alpha);
    },
  };
}

const SQRT5 = Math.sqrt(5);

/**
 * ∂LML/∂θ = ½ Σ_ij W_ij ∂K_ij/∂θ with W = ααᵀ − K⁻¹, formed once (lower triangle) from the factor in `work.k`;
 * each length-scale component is a sum over pairs i > j of W_ij ∂K_ij, from the cached per-dimension squared
 * differences (no dense ∂K/∂θ matrices).
 */
function likelihoodGradient(work: LikelihoodWork, theta: Float64Array, alpha: Float64Array): Float64Array {
  const { n, d, kind, diffs, r2 } = work;
  work.gradients++;
  work.u ??= new Float64Array(n * n);
  work.inv ??= new Float64Array(n * n);
  const kinv = inverseLowerFromCholesky(work.k, n, work.inv, work.u);
  const gradient = new Float64Array(d + 2);
  const sf2 = Math.exp(theta[d]!);
  const sn2 = Math.exp(theta[d + 1]!);
  const w = new Float64Array(d);
  for (let c = 0; c < d; c++) w[c] = Math.exp(-2 * theta[c]!);
  // Each off-diagonal pair counts twice, cancelling the ½.
  let traceW = 0;
  for (let i = 0; i < n; i++) traceW += alpha[i]! * alpha[i]! - kinv[i * n + i]!;
  let signal = 0.5 * traceW;
  const lengths = new Float64Array(d);
  const matern = kind === 'matern52';
  let p = 0;
  for (let i = 1; i < n; i++) {
    const row = i * n;
    const ai = alpha[i]!;
    for (let j = 0; j < i; j++) {
      const wij = ai * alpha[j]! - kinv[row + j]!;
      const s = r2[p]!;
      // The correlation of kernels.ts and sens = −2 d(correlation)/d(r²), which times (Δ_c/ℓ_c)² gives
      // d(correlation)/d(log ℓ_c); sharing one sqrt and one exp per pair.
      let corr: number;
      let sens: number;
      if (matern) {
        const r = Math.sqrt(s);
        const e = Math.exp(-SQRT5 * r);
        corr = (1 + SQRT5 * r + (5 / 3) * s) * e;
        sens = (5 / 3) * (1 + SQRT5 * r) * e;
      } else {
        corr = Math.exp(-0.5 * s);
        sens = corr;
      }
      signal += wij * corr;
      const g = wij * sens;
      const base = p * d;
      for (let c = 0; c < d; c++) lengths[c] = lengths[c]! + g * diffs[base + c]!;
      p++;
    }
  }
  for (let c = 0; c < d; c++) gradient[c] = lengths[c]! * sf2 * w[c]!;
  gradient[d] = signal * sf2;
  gradient[d + 1] = 0.5 * sn2 * traceW;
  return gradient;
}

function validateTrainingData(inputs: readonly ArrayLike<number>[], y: ArrayLike<number>): number {
  if (inputs.length < 2) throw invalidInput('data', 'a Gaussian process needs at least two observations with a response');
  if (y.length !== inputs.length) throw invalidInput('data', 'one response value is needed per input row');
  const d = inputs[0]!.length;
  for (let i = 0; i < inputs.length; i++) {
    if (inputs[i]!.length !== d) throw invalidInput(`data[${i}]`, 'every input row needs the same number of coordinates');
    if (!Number.isFinite(y[i]!)) throw invalidInput(`data[${i}]`, 'responses must be finite numbers');
  }
  return d;
}

/** Fit a GP: hyperparameters by maximum marginal likelihood (multi-start bounded L-BFGS), unless fixed. */
export function fitGaussianProcess(inputs: readonly ArrayLike<number>[], y: ArrayLike<number>, options: GaussianProcessOptions = {}): GaussianProcessModel {
  const d = validateTrainingData(inputs, y);
  const n = inputs.length;
  const kind = options.kernel ?? 'matern52';
  const categorical = (options.categorical ?? new Array<boolean>(d).fill(false)).slice();
  if (categorical.length !== d) throw invalidInput('categorical', 'give one categorical flag per input column');
  const normalize = options.normalize ?? true;
  let yMean = 0;
  let yScale = 1;
  if (normalize) {
    for (let i = 0; i < n; i++) yMean += y[i]!;
    yMean /= n;
    let ss = 0;
    for (let i = 0; i < n; i++) ss += (y[i]! - yMean) ** 2;
    const sd = Math.sqrt(ss / n);
    yScale = sd > 0 ? sd : 1;
  }
  const ys = new Float64Array(n);
  for (let i = 0; i < n; i++) ys[i] = (y[i]! - yMean) / yScale;
  const x = inputs.map((row) => Float64Array.from(row));
  const work = likelihoodWork(n, d, kind, ys, pairwiseSquaredDifferences(x, categorical));
  let iterations = 0;
  let startsRun = 0;

  let theta: Float64Array;
  if (options.fixed) {
    const { lengthScales, signalVariance, noiseVariance } = options.fixed;
    if (lengthScales.length !== d) throw invalidInput('lengthScales', 'give one length scale per input column');
    theta = new Float64Array(d + 2);
    for (let c = 0; c < d; c++) theta[c] = Math.log(lengthScales[c]!);
    theta[d] = Math.log(signalVariance);
    theta[d + 1] = Math.log(noiseVariance);
  } else {
    const [lMin, lMax] = options.lengthScaleBounds ?? [0.01, 100];
    const [nMin, nMax] = options.noiseVarianceBounds ?? [1e-6, 10];
    const lower = new Float64Array(d + 2);
    const upper = new Float64Array(d + 2);
    for (let c = 0; c < d; c++) {
      lower[c] = Math.log(lMin);
      upper[c] = Math.log(lMax);
    }
    lower[d] = Math.log(1e-3);
    upper[d] = Math.log(1e4);
    lower[d + 1] = Math.log(nMin);
    upper[d + 1] = Math.log(nMax);
    const rng = seededRandom(options.seed ?? 1);
    const starts = Math.max(1, options.starts ?? 4);
    const objective = (t: Float64Array) => {
      const r = likelihoodLazy(work, t);
      return {
        value: Number.isFinite(r.value) ? -r.value : Infinity,
        gradient: () => r.gradient().map((v) => -v),
      };
    };
    const settings = { lower, upper, maxIterations: options.maxIterations ?? 150, maxStep: 2, valueTolerance: 1e-8, gradientTolerance: 1e-4 };
    let best: { x: Float64Array; value: number } | null = null;
    for (let s = 0; s < starts; s++) {
      const x0 = new Float64Array(d + 2);
      if (s === 0) {
        for (let c = 0; c < d; c++) x0[c] = Math.log(0.7);
        x0[d] = 0;
        x0[d + 1] = Math.log(0.05);
      } else {
        for (let c = 0; c < d; c++) x0[c] = Math.log(0.1) + rng.next() * (Math.log(3) - Math.log(0.1));
        x0[d] = Math.log(0.3) + rng.next() * (Math.log(3) - Math.log(0.3));
        x0[d + 1] = Math.log(1e-4) + rng.next() * (Math.log(0.3) - Math.log(1e-4));
      }
      const r = minimizeBounded(objective, x0, settings);
      iterations += r.iterations;
      startsRun++;
      if (Number.isFinite(r.value) && (best === null || r.value < best.value)) best = { x: r.x, value: r.value };
    }
    if (best === null) throw invalidInput('data', 'the Gaussian process could not be fitted; check for duplicated inputs with very different responses');
    theta = best.x;
  }

  const optimisation = { starts: startsRun, iterations, evaluations: work.evaluations, gradientEvaluations: work.gradients };
  const k = work.k;
  buildCovariance(work, theta, k, work.r2);
  if (!choleskyInPlace(k, n)) throw invalidInput('data', 'the covariance matrix is not positive definite for these hyperparameters');
  const alpha = solveUpperTransposed(k, n, solveLower(k, n, ys));
  let fit = 0;
  for (let i = 0; i < n; i++) fit += ys[i]! * alpha[i]!;
  const lmlStd = -0.5 * fit - 0.5 * choleskyLogDet(k, n) - 0.5 * n * LOG_2PI;
  return {
    kernel: kind,
    categorical,
    inputs: x,
    n,
    d,
    lengthScales: Array.from(theta.subarray(0, d), (t) => Math.exp(t)),
    signalVariance: Math.exp(theta[d]!) * yScale * yScale,
    noiseVariance: Math.exp(theta[d + 1]!) * yScale * yScale,
    logMarginalLikelihood: lmlStd - n * Math.log(yScale),
    logMarginalLikelihoodStandardised: lmlStd,
    yMean,
    yScale,
    theta,
    cholesky: k,
    alpha,
    yStandardised: ys,
    optimisation,
  };
}

/** Covariance (standardised units, signal part) between a point and every training input. */
export function crossCovariance(model: GaussianProcessModel, point: ArrayLike<number>, out = new Float64Array(model.n)): Float64Array {
  const { d, theta, categorical, kernel, inputs } = model;
  const sf2 = Math.exp(theta[d]!);
  const w = new Float64Array(d);
  for (let c = 0; c < d; c++) w[c] = Math.exp(-2 * theta[c]!);
  for (let i = 0; i < model.n; i++) {
    const xi = inputs[i]!;
    let s = 0;
    for (let c = 0; c < d; c++) {
      let d2: number;
      if (categorical[c]) d2 = xi[c] === point[c] ? 0 : 1;
      else {
        const diff = xi[c]! - point[c]!;
        d2 = diff * diff;
      }
      s += d2 * w[c]!;
    }
    out[i] = sf2 * correlation(kernel, s);
  }
  return out;
}

/** Covariance (standardised units, signal part) between two points. */
export function pointCovariance(model: GaussianProcessModel, a: ArrayLike<number>, b: ArrayLike<number>): number {
  const { d, theta, categorical, kernel } = model;
  let s = 0;
  for (let c = 0; c < d; c++) {
    let d2: number;
    if (categorical[c]) d2 = a[c] === b[c] ? 0 : 1;
    else {
      const diff = a[c]! - b[c]!;
      d2 = diff * diff;
    }
    s += d2 * Math.exp(-2 * theta[c]!);
  }
  return Math.exp(theta[d]!) * correlation(kernel, s);
}

export interface Prediction {
  /** Posterior mean of the latent function, response units. */
  mean: number;
  /** Posterior standard deviation of the latent function (without observation noise), response units. */
  sd: number;
}

/** Posterior mean and sd of the latent function at one coded point. */
export function predict(model: GaussianProcessModel, point: ArrayLike<number>): Prediction {
  const ks = crossCovariance(model, point);
  let m = 0;
  for (let i = 0; i < model.n; i++) m += ks[i]! * model.alpha[i]!;
  const v = solveLower(model.cholesky, model.n, ks);
  let vv = 0;
  for (let i = 0; i < model.n; i++) vv += v[i]! * v[i]!;
  const variance = Math.max(0, Math.exp(model.theta[model.d]!) - vv);
  return { mean: model.yMean + model.yScale * m, sd: model.yScale * Math.sqrt(variance) };
}

/**
 * Leave-one-out predictive residuals y_i − μ_{−i}(x_i) and their predictive sd, in closed form:
 * μ_{−i} = y_i − [K⁻¹y]_i / [K⁻¹]_ii, var_{−i} = 1 / [K⁻¹]_ii (hyperparameters held fixed).
 */
// Rasmussen & Williams (2006), Gaussian Processes for Machine Learning, eq. 5.12
export function leaveOneOutResiduals(model: GaussianProcessModel): { residual: number[]; sd: number[]; standardised: number[] } {
  const kinv = inverseFromCholesky(model.cholesky, model.n);
  const residual: number[] = [];
  const sd: number[] = [];
  const standardised: number[] = [];
  for (let i = 0; i < model.n; i++) {
    const kii = kinv[i * model.n + i]!;
    const r = model.alpha[i]! / kii;
    const s = Math.sqrt(1 / kii);
    residual.push(r * model.yScale);
    sd.push(s * model.yScale);
    standardised.push(r / s);
  }
  return { residual, sd, standardised };
}
