/**
 * Feasibility model from failed trials: Gaussian-process classification (trial ran / trial failed)
 * with a logistic likelihood, by the Laplace approximation. The prior mean is the logit of the smoothed
 * success rate, so settings far from every trial get the campaign's overall rate rather than one half.
 * Kernel hyperparameters (one length scale for all coded inputs, a signal variance) are chosen on a
 * small grid by the Laplace approximation to the marginal likelihood.
 */
// Rasmussen & Williams (2006), Gaussian Processes for Machine Learning, algorithms 3.1-3.2 and eq. 3.32
import { correlation, type KernelKind } from './kernels';
import { choleskyInPlace } from './linear-algebra';

export interface FeasibilityModel {
  kernel: KernelKind;
  categorical: boolean[];
  inputs: Float64Array[];
  n: number;
  lengthScale: number;
  signalVariance: number;
  priorMean: number;
  /** ∇ log p(y | f̂) at the mode. */
  gradient: Float64Array;
  /** W^½ at the mode. */
  sqrtW: Float64Array;
  /** Cholesky factor of B = I + W^½ K W^½, row-major. */
  cholesky: Float64Array;
  logMarginalLikelihood: number;
  failures: number;
}

function sigmoid(z: number): number {
  return z >= 0 ? 1 / (1 + Math.exp(-z)) : Math.exp(z) / (1 + Math.exp(z));
}

function logSigmoid(z: number): number {
  return z >= 0 ? -Math.log1p(Math.exp(-z)) : z - Math.log1p(Math.exp(z));
}

function covariance(a: ArrayLike<number>, b: ArrayLike<number>, categorical: readonly boolean[], lengthScale: number, sf2: number, kind: KernelKind): number {
  let r2 = 0;
  for (let k = 0; k < categorical.length; k++) {
    const d2 = categorical[k] ? (a[k] === b[k] ? 0 : 1) : (a[k]! - b[k]!) ** 2;
    r2 += d2;
  }
  return sf2 * correlation(kind, r2 / (lengthScale * lengthScale));
}

function laplaceFit(
  inputs: Float64Array[],
  ok: boolean[],
  categorical: boolean[],
  kind: KernelKind,
  lengthScale: number,
  sf2: number,
  priorMean: number,
): FeasibilityModel | null {
  const n = inputs.length;
  const k = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const v = covariance(inputs[i]!, inputs[j]!, categorical, lengthScale, sf2, kind);
      k[i * n + j] = v;
      k[j * n + i] = v;
    }
  }
  const t = ok.map((v) => (v ? 1 : 0));
  const f = new Float64Array(n);
  const a = new Float64Array(n);
  const sqrtW = new Float64Array(n);
  const grad = new Float64Array(n);
  let l = new Float64Array(n * n);
  let objective = -Infinity;
  for (let iter = 0; iter < 50; iter++) {
    for (let i = 0; i < n; i++) {
      const p = sigmoid(f[i]! + priorMean);
      grad[i] = t[i]! - p;
      sqrtW[i] = Math.sqrt(p * (1 - p));
    }
    l = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j <= i; j++) l[i * n + j] = sqrtW[i]! * k[i * n + j]! * sqrtW[j]! + (i === j ? 1 : 0);
    }
    if (!choleskyInPlace(l, n)) return null;
    // b = W f + ∇;  a = b − W^½ B⁻¹ W^½ K b;  f = K a
    const b = new Float64Array(n);
    for (let i = 0; i < n; i++) b[i] = sqrtW[i]! * sqrtW[i]! * f[i]! + grad[i]!;
    const kb = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = 0; j < n; j++) s += k[i * n + j]! * b[j]!;
      kb[i] = sqrtW[i]! * s;
    }
    const z = solveB(l, n, kb);
    for (let i = 0; i < n; i++) a[i] = b[i]! - sqrtW[i]! * z[i]!;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = 0; j < n; j++) s += k[i * n + j]! * a[j]!;
      f[i] = s;
    }
    let next = 0;
    for (let i = 0; i < n; i++) next += -0.5 * a[i]! * f[i]! + logSigmoid((2 * t[i]! - 1) * (f[i]! + priorMean));
    if (Math.abs(next - objective) < 1e-9 * Math.max(1, Math.abs(next))) {
      objective = next;
      break;
    }
    objective = next;
  }
  // Recompute W, B and ∇ at the mode for prediction.
  for (let i = 0; i < n; i++) {
    const p = sigmoid(f[i]! + priorMean);
    grad[i] = t[i]! - p;
    sqrtW[i] = Math.sqrt(p * (1 - p));
  }
  l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) l[i * n + j] = sqrtW[i]! * k[i * n + j]! * sqrtW[j]! + (i === j ? 1 : 0);
  }
  if (!choleskyInPlace(l, n)) return null;
  let logDetHalf = 0;
  for (let i = 0; i < n; i++) logDetHalf += Math.log(l[i * n + i]!);
  return {
    kernel: kind,
    categorical,
    inputs,
    n,
    lengthScale,
    signalVariance: sf2,
    priorMean,
    gradient: grad,
    sqrtW,
    cholesky: l,
    logMarginalLikelihood: objective - logDetHalf,
    failures: t.filter((v) => v === 0).length,
  };
}

/** B⁻¹ x with B = L Lᵀ (row-major lower-triangular L). */
function solveB(l: Float64Array, n: number, x: Float64Array): Float64Array {
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = x[i]!;
    for (let j = 0; j < i; j++) s -= l[i * n + j]! * y[j]!;
    y[i] = s / l[i * n + i]!;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let j = i + 1; j < n; j++) s -= l[j * n + i]! * y[j]!;
    y[i] = s / l[i * n + i]!;
  }
  return y;
}

/**
 * Fit the feasibility classifier; null when no trial failed (every setting is then taken as feasible).
 * `failed[i]` marks trial i as failed (fell, broke, stalled).
 */
export function fitFeasibility(
  inputs: readonly ArrayLike<number>[],
  failed: readonly boolean[],
  categorical: readonly boolean[],
  kind: KernelKind = 'matern52',
): FeasibilityModel | null {
  const failures = failed.filter(Boolean).length;
  if (failures === 0) return null;
  const x = inputs.map((r) => Float64Array.from(r));
  const ok = failed.map((f) => !f);
  const successes = ok.filter(Boolean).length;
  const rate = (successes + 1) / (ok.length + 2);
  const priorMean = Math.log(rate / (1 - rate));
  let best: FeasibilityModel | null = null;
  for (const lengthScale of [0.2, 0.4, 0.8]) {
    for (const sf2 of [1, 4, 16]) {
      const m = laplaceFit(x, ok, categorical.slice(), kind, lengthScale, sf2, priorMean);
      if (m && (best === null || m.logMarginalLikelihood > best.logMarginalLikelihood)) best = m;
    }
  }
  return best;
}

/** Probability that a trial at a coded point does not fail: σ(f̄ / √(1 + πV/8)) (probit approximation, R&W eq. 3.25). */
export function feasibilityProbability(model: FeasibilityModel, point: ArrayLike<number>): number {
  const n = model.n;
  const ks = new Float64Array(n);
  for (let i = 0; i < n; i++) ks[i] = covariance(model.inputs[i]!, point, model.categorical, model.lengthScale, model.signalVariance, model.kernel);
  let mean = model.priorMean;
  for (let i = 0; i < n; i++) mean += ks[i]! * model.gradient[i]!;
  const v = new Float64Array(n);
  const l = model.cholesky;
  for (let i = 0; i < n; i++) {
    let s = model.sqrtW[i]! * ks[i]!;
    for (let j = 0; j < i; j++) s -= l[i * n + j]! * v[j]!;
    v[i] = s / l[i * n + i]!;
  }
  let vv = 0;
  for (let i = 0; i < n; i++) vv += v[i]! * v[i]!;
  const variance = Math.max(0, model.signalVariance - vv);
  return sigmoid(mean / Math.sqrt(1 + (Math.PI * variance) / 8));
}
