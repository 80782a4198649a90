/**
 * Local penalisation for batches: instead of conditioning the model on the trials already chosen, the
 * acquisition is multiplied by one factor per chosen trial x_j, the probability that x lies outside the
 * ball around x_j that cannot hold the optimum. With L a Lipschitz constant of the (goal-signed) mean and
 * M the best value, that ball has radius (M − f(x_j)) / L, and with f(x_j) ~ N(μ_j, σ_j²)
 * φ(x; x_j) = Φ((L ‖x − x_j‖ − M + μ_j) / σ_j).
 * L is estimated as the largest norm of the posterior-mean gradient over the candidates; the caller gives
 * M (the strategy uses the largest posterior mean over the candidates, so that no ball has a negative radius).
 */
// González, Dai, Hennig & Lawrence (2016), AISTATS, "Batch Bayesian optimization via local penalization"
import { standardNormalCdf } from './acquisition';
import type { GaussianProcessModel } from './gaussian-process';
import { predictStandardised } from './posterior';

const SQRT5 = Math.sqrt(5);

/** Coded distance: numeric coordinates as they are, a categorical coordinate counts 1 when the levels differ. */
export function codedDistance(a: ArrayLike<number>, b: ArrayLike<number>, categorical: readonly boolean[]): number {
  let s = 0;
  for (let k = 0; k < categorical.length; k++) {
    if (categorical[k]) s += a[k] === b[k] ? 0 : 1;
    else {
      const d = a[k]! - b[k]!;
      s += d * d;
    }
  }
  return Math.sqrt(s);
}

/** Norm of the gradient of the standardised posterior mean at x (numeric coordinates), per coded unit. */
export function meanGradientNorm(model: GaussianProcessModel, x: ArrayLike<number>): number {
  const { d, theta, categorical, kernel, inputs, alpha } = model;
  const sf2 = Math.exp(theta[d]!);
  const w = new Float64Array(d);
  for (let c = 0; c < d; c++) w[c] = Math.exp(-2 * theta[c]!);
  const grad = new Float64Array(d);
  for (let i = 0; i < model.n; i++) {
    const xi = inputs[i]!;
    let r2 = 0;
    for (let c = 0; c < d; c++) {
      const diff = categorical[c] ? (xi[c] === x[c] ? 0 : 1) : x[c]! - xi[c]!;
      r2 += diff * diff * w[c]!;
    }
    // d corr / d x_c = −sens · Δ_c / ℓ_c², sens = −2 d corr / d r².
    let sens: number;
    if (kernel === 'matern52') {
      const r = Math.sqrt(r2);
      sens = (5 / 3) * (1 + SQRT5 * r) * Math.exp(-SQRT5 * r);
    } else sens = Math.exp(-0.5 * r2);
    const f = -alpha[i]! * sf2 * sens;
    for (let c = 0; c < d; c++) if (!categorical[c]) grad[c] = grad[c]! + f * (x[c]! - xi[c]!) * w[c]!;
  }
  let s = 0;
  for (let c = 0; c < d; c++) s += grad[c]! * grad[c]!;
  return Math.sqrt(s);
}

/** Largest mean-gradient norm over (up to 500 of) the points: the Lipschitz estimate of the mean. */
export function lipschitzEstimate(model: GaussianProcessModel, points: readonly ArrayLike<number>[]): number {
  const step = Math.max(1, Math.ceil(points.length / 500));
  let top = 0;
  for (let i = 0; i < points.length; i += step) top = Math.max(top, meanGradientNorm(model, points[i]!));
  return Math.max(top, 1e-7);
}

function logCdf(z: number): number {
  if (z > -30) return Math.log(Math.max(standardNormalCdf(z), 1e-300));
  // Far tail: log Φ(z) ≈ −z²/2 − log(−z) − ½ log 2π.
  return -0.5 * z * z - Math.log(-z) - 0.5 * Math.log(2 * Math.PI);
}

/** Running sum of log penalties over a fixed candidate set, in standardised goal units (larger is better). */
export class LocalPenalty {
  readonly model: GaussianProcessModel;
  readonly sign: number;
  readonly lipschitz: number;
  /** M: the best (goal-signed, standardised) value. */
  readonly best: number;
  readonly pool: readonly Float64Array[];
  private readonly sums: Float64Array;
  private readonly centres: { x: Float64Array; mean: number; sd: number }[] = [];

  constructor(model: GaussianProcessModel, sign: number, pool: readonly Float64Array[], best: number, lipschitz = lipschitzEstimate(model, pool)) {
    this.model = model;
    this.sign = sign;
    this.pool = pool;
    this.best = best;
    this.lipschitz = lipschitz;
    this.sums = new Float64Array(pool.length);
  }

  private term(x: ArrayLike<number>, centre: { x: Float64Array; mean: number; sd: number }): number {
    const distance = codedDistance(x, centre.x, this.model.categorical);
    return logCdf((this.lipschitz * distance - this.best + centre.mean) / centre.sd);
  }

  /** Penalise around a chosen trial. */
  add(x: Float64Array): void {
    const p = predictStandardised(this.model, x);
    const centre = { x, mean: this.sign * p.mean, sd: Math.max(Math.sqrt(p.variance), 1e-9) };
    this.centres.push(centre);
    for (let c = 0; c < this.pool.length; c++) this.sums[c] = this.sums[c]! + this.term(this.pool[c]!, centre);
  }

  /** Σ_j log φ(candidate c; x_j). */
  logPenalty(c: number): number {
    return this.sums[c]!;
  }

  logPenaltyAt(x: ArrayLike<number>): number {
    let s = 0;
    for (const centre of this.centres) s += this.term(x, centre);
    return s;
  }
}
