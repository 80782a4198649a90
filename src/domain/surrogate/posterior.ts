/**
 * The fitted GP's posterior over a fixed set of candidate points, conditioned step by step on "believed"
 * trials of a batch (each added as if it returned its predicted mean — the mean surface is unchanged,
 * the variance shrinks nearby). Variances and covariances are updated by rank-one steps of the growing
 * Cholesky factor, so a batch of b trials over m candidates costs O(m (n + b)) per step.
 */
// Ginsbourger, Le Riche & Carraro (2010), Computational Intelligence in Expensive Optimization Problems, 131-162 (kriging believer)
import { crossCovariance, pointCovariance, type GaussianProcessModel } from './gaussian-process';
import { solveLower } from './linear-algebra';

/** Standardised posterior mean of the fitted model at a point. */
export function meanStandardised(model: GaussianProcessModel, point: ArrayLike<number>): number {
  const k = crossCovariance(model, point);
  let m = 0;
  for (let i = 0; i < model.n; i++) m += k[i]! * model.alpha[i]!;
  return m;
}

/** Standardised posterior mean and latent variance of the fitted model (no believed points). */
export function predictStandardised(model: GaussianProcessModel, point: ArrayLike<number>): { mean: number; variance: number } {
  const k = crossCovariance(model, point);
  let mean = 0;
  for (let i = 0; i < model.n; i++) mean += k[i]! * model.alpha[i]!;
  const v = solveLower(model.cholesky, model.n, k);
  let vv = 0;
  for (let i = 0; i < model.n; i++) vv += v[i]! * v[i]!;
  return { mean, variance: Math.max(0, Math.exp(model.theta[model.d]!) - vv) };
}

/** Standardised posterior means at the training inputs: K_f α = y − σ_n² α. */
export function meansAtObservations(model: GaussianProcessModel): Float64Array {
  const nugget = noiseStandardised(model);
  const out = new Float64Array(model.n);
  for (let i = 0; i < model.n; i++) out[i] = model.yStandardised[i]! - nugget * model.alpha[i]!;
  return out;
}

/** Noise variance plus the numerical jitter, standardised units. */
export function noiseStandardised(model: GaussianProcessModel): number {
  return Math.exp(model.theta[model.d + 1]!) + 1e-10;
}

/** A growing Cholesky factor of the training covariance with believed points appended. */
export class BelieverPosterior {
  readonly model: GaussianProcessModel;
  private readonly l: Float64Array;
  private size: number;
  private readonly capacity: number;
  readonly points: Float64Array[];
  readonly sf2: number;
  readonly nugget: number;

  constructor(model: GaussianProcessModel, extra: number) {
    this.model = model;
    this.size = model.n;
    this.capacity = model.n + extra;
    this.l = new Float64Array(this.capacity * this.capacity);
    for (let i = 0; i < model.n; i++) {
      for (let j = 0; j <= i; j++) this.l[i * this.capacity + j] = model.cholesky[i * model.n + j]!;
    }
    this.points = model.inputs.slice();
    this.sf2 = Math.exp(model.theta[model.d]!);
    this.nugget = noiseStandardised(model);
  }

  get n(): number {
    return this.size;
  }

  /** v = L⁻¹ k(X, x) over the current (observed + believed) points. */
  whiten(point: ArrayLike<number>): Float64Array {
    const n = this.size;
    const cap = this.capacity;
    const v = new Float64Array(n);
    crossCovariance(this.model, point, v.subarray(0, this.model.n));
    for (let i = this.model.n; i < n; i++) v[i] = pointCovariance(this.model, this.points[i]!, point);
    for (let i = 0; i < n; i++) {
      const row = i * cap;
      let s = v[i]!;
      for (let j = 0; j < i; j++) s -= this.l[row + j]! * v[j]!;
      v[i] = s / this.l[row + i]!;
    }
    return v;
  }

  /** Standardised latent posterior variance at a point. */
  variance(point: ArrayLike<number>): number {
    const v = this.whiten(point);
    let vv = 0;
    for (let i = 0; i < v.length; i++) vv += v[i]! * v[i]!;
    return Math.max(0, this.sf2 - vv);
  }

  /** Append a believed observation at `point`; returns its whitened row and the new diagonal of L. */
  add(point: Float64Array): { v: Float64Array; diagonal: number } {
    const v = this.whiten(point);
    let vv = 0;
    for (let i = 0; i < v.length; i++) vv += v[i]! * v[i]!;
    const diagonal = Math.sqrt(Math.max(this.sf2 + this.nugget - vv, 1e-12));
    const row = this.size * this.capacity;
    for (let j = 0; j < this.size; j++) this.l[row + j] = v[j]!;
    this.l[row + this.size] = diagonal;
    this.points.push(point);
    this.size++;
    return { v, diagonal };
  }
}

/**
 * Latent variances of a fixed point set under the believer posterior, and (optionally) their covariances
 * with a reference set, kept current as believed points are added.
 */
export class CandidateVariances {
  readonly posterior: BelieverPosterior;
  readonly points: readonly Float64Array[];
  readonly variance: Float64Array;
  private readonly whitened: Float64Array[];

  /** `base`, when given, holds the same points over the same (un-extended) posterior: its state is copied. */
  constructor(posterior: BelieverPosterior, points: readonly Float64Array[], extra: number, base?: CandidateVariances) {
    this.posterior = posterior;
    this.points = points;
    this.variance = new Float64Array(points.length);
    this.whitened = [];
    if (base && base.points === points && posterior.n === posterior.model.n) {
      this.variance.set(base.variance);
      for (let c = 0; c < points.length; c++) {
        const grown = new Float64Array(posterior.n + extra);
        grown.set(base.whitened[c]!.subarray(0, posterior.n));
        this.whitened.push(grown);
      }
      return;
    }
    for (let c = 0; c < points.length; c++) {
      const v = posterior.whiten(points[c]!);
      let vv = 0;
      for (let i = 0; i < v.length; i++) vv += v[i]! * v[i]!;
      this.variance[c] = Math.max(0, posterior.sf2 - vv);
      const grown = new Float64Array(posterior.n + extra);
      grown.set(v);
      this.whitened.push(grown);
    }
  }

  /** Whitened vectors over the current posterior (first `posterior.n` entries valid). */
  whitenedOf(c: number): Float64Array {
    return this.whitened[c]!;
  }

  /**
   * Update after `posterior.add(point)` returned `added`: returns each point's new whitened component u,
   * the posterior covariance with the added point divided by the added point's predictive sd.
   */
  update(point: Float64Array, added: { v: Float64Array; diagonal: number }): Float64Array {
    const column = this.posterior.n - 1;
    const model = this.posterior.model;
    const u = new Float64Array(this.points.length);
    for (let c = 0; c < this.points.length; c++) {
      const w = this.whitened[c]!;
      let dot = 0;
      for (let i = 0; i < column; i++) dot += w[i]! * added.v[i]!;
      const value = (pointCovariance(model, this.points[c]!, point) - dot) / added.diagonal;
      w[column] = value;
      u[c] = value;
      this.variance[c] = Math.max(0, this.variance[c]! - value * value);
    }
    return u;
  }
}
